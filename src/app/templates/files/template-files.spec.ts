import { HttpEventType, provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { nextRequest, nextTask } from '../../../testing/http-testing';
import { TemplateFile, TemplateFiles, sizeText } from './template-files';

const file = (over: Partial<TemplateFile> & Pick<TemplateFile, 'id'>): TemplateFile => ({
  templateId: 11,
  stageKey: 'st-audio',
  stageName: 'First audio',
  name: `file-${over.id}.png`,
  caption: '',
  mediaType: 'image/png',
  kind: 'image',
  bytes: 20480,
  width: 640,
  height: 400,
  url: `/api/templates/11/files/${over.id}`,
  thumbnailUrl: `/api/templates/11/files/${over.id}/thumbnail`,
  createdBy: 7,
  createdAt: '2026-03-02T10:00:00Z',
  ...over,
});

const PHOTO = file({ id: 1, name: 'under chassis.png', caption: 'Under the chassis, output stage' });
const SCHEMATIC = file({ id: 2, name: 'schematic.pdf', mediaType: 'application/pdf', kind: 'pdf', bytes: 1_200_000, width: null, height: null, thumbnailUrl: null });
const ELSEWHERE = file({ id: 3, stageKey: null, stageName: null, name: 'front.png' });

/** A few bytes standing in for a WebP thumbnail (the strip only turns it into an object URL). */
const thumbBlob = () => new Blob([new Uint8Array([0x52, 0x49, 0x46, 0x46])], { type: 'image/webp' });

describe('TemplateFiles', () => {
  let fixture: ComponentFixture<TemplateFiles>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  const el = () => fixture.nativeElement as HTMLElement;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => {
    TestBed.inject(MatDialog).closeAll();
    http.verify();
  });

  async function settle(): Promise<void> {
    await fixture.whenStable();
    await nextTask();
    await fixture.whenStable();
  }

  async function open(items: TemplateFile[], opts: { stageKey?: string | null; canEdit?: boolean } = {}): Promise<void> {
    fixture = TestBed.createComponent(TemplateFiles);
    fixture.componentRef.setInput('templateId', 11);
    fixture.componentRef.setInput('stageKey', opts.stageKey === undefined ? 'st-audio' : opts.stageKey);
    fixture.componentRef.setInput('canEdit', opts.canEdit ?? false);
    fixture.componentRef.setInput('stages', [
      { key: 'st-audio', name: 'First audio' },
      { key: 'st-output', name: 'Output' },
    ]);
    loader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await settle();
    http.expectOne('/api/templates/11/files').flush({ templateId: 11, items });
    await settle();
  }

  function choose(files: File[]): void {
    const input = el().querySelector<HTMLInputElement>('input[type=file]')!;
    const dt = new DataTransfer();
    for (const f of files) dt.items.add(f);
    input.files = dt.files;
    input.dispatchEvent(new Event('change'));
  }

  it("renders the stage's images as thumbnails fetched as blobs with their captions, and PDFs as a page icon with the file name", async () => {
    await open([PHOTO, SCHEMATIC, ELSEWHERE]);
    const thumb = http.expectOne(PHOTO.thumbnailUrl!);
    expect(thumb.request.responseType).toBe('blob');
    thumb.flush(thumbBlob());
    // The PDF has no thumbnail and the whole-template file belongs to another strip: nothing else is asked.
    http.expectNone(ELSEWHERE.thumbnailUrl!);
    await settle();

    const tiles = Array.from(el().querySelectorAll<HTMLElement>('li.file'));
    expect(tiles.map((t) => t.dataset['fileId'])).toEqual(['1', '2']);
    expect(tiles[0].querySelector<HTMLImageElement>('img.thumb')?.src).toMatch(/^blob:/);
    expect(tiles[0].querySelector('.caption')?.textContent?.trim()).toBe('Under the chassis, output stage');
    expect(tiles[1].querySelector('img')).toBeNull();
    expect(tiles[1].querySelector('mat-icon')?.textContent?.trim()).toBe('picture_as_pdf');
    expect(tiles[1].querySelector('.name')?.textContent?.trim()).toBe('schematic.pdf');
    expect(tiles[1].querySelector('button')?.getAttribute('aria-label')).toBe('schematic.pdf (PDF, 1.1 MiB): open in the viewer');
    // A reader gets no upload button.
    expect(el().querySelector('input[type=file]')).toBeNull();
  });

  it('shows the whole-template files when stageKey is null', async () => {
    await open([PHOTO, ELSEWHERE], { stageKey: null });
    http.expectOne(ELSEWHERE.thumbnailUrl!).flush(thumbBlob());
    await settle();
    expect(Array.from(el().querySelectorAll<HTMLElement>('li.file')).map((t) => t.dataset['fileId'])).toEqual(['3']);
  });

  it('uploads as multipart with the stage key and shows the progress; a refusal shows the API message; the next file is taken and joins the strip', async () => {
    await open([], { canEdit: true });
    expect(el().textContent).toContain('No schematics or photos yet.');

    choose([new File([new Uint8Array(64)], 'huge.png', { type: 'image/png' })]);
    await settle();
    const refused = http.expectOne((r) => r.method === 'POST' && r.url === '/api/templates/11/files');
    const body = refused.request.body as FormData;
    expect(body instanceof FormData).toBeTrue();
    expect(body.get('stageKey')).toBe('st-audio');
    expect((body.get('file') as File).name).toBe('huge.png');
    expect(refused.request.reportProgress).toBeTrue();
    refused.event({ type: HttpEventType.UploadProgress, loaded: 32, total: 64 });
    await settle();
    expect(el().querySelector('.progress')?.textContent).toContain('Uploading huge.png · 50 %');
    expect(await (await loader.getHarness(MatProgressBarHarness)).getValue()).toBe(50);
    refused.flush(
      { error: { code: 'image-too-large', message: 'The image declares 50000 × 50000 pixels (2500.0 megapixels); the limit is 40.0 megapixels.', details: { field: 'file' } } },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle();
    expect(el().querySelector('.upload-error')?.textContent).toContain('huge.png: The image declares 50000 × 50000 pixels');
    expect(el().querySelector('.progress')).toBeNull();
    expect(el().querySelectorAll('li.file').length).toBe(0);

    // The twin, dropped on the strip: taken, listed, its thumbnail fetched.
    const dt = new DataTransfer();
    dt.items.add(new File([new Uint8Array(64)], 'small.png', { type: 'image/png' }));
    el().querySelector('.strip')!.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
    await settle();
    const ok = http.expectOne((r) => r.method === 'POST' && r.url === '/api/templates/11/files');
    expect(((ok.request.body as FormData).get('file') as File).name).toBe('small.png');
    expect(el().querySelector('.upload-error')).withContext('the old refusal is cleared').toBeNull();
    ok.flush(file({ id: 9, name: 'small.png' }), { status: 201, statusText: 'Created' });
    await settle();
    http.expectOne('/api/templates/11/files/9/thumbnail').flush(thumbBlob());
    await settle();
    expect(Array.from(el().querySelectorAll<HTMLElement>('li.file')).map((t) => t.dataset['fileId'])).toEqual(['9']);
  });

  it('sends no stageKey for the whole template', async () => {
    await open([], { canEdit: true, stageKey: null });
    choose([new File(['%PDF-1.4'], 'sheet.pdf', { type: 'application/pdf' })]);
    await settle();
    const req = http.expectOne((r) => r.method === 'POST');
    expect((req.request.body as FormData).has('stageKey')).toBeFalse();
    req.flush(SCHEMATIC, { status: 201, statusText: 'Created' });
  });

  it('opens the viewer with the image from a blob, caption, name, size and pixels, and a Download link', async () => {
    await open([PHOTO]);
    http.expectOne(PHOTO.thumbnailUrl!).flush(thumbBlob());
    await settle();
    el().querySelector<HTMLButtonElement>('li.file button')!.click();
    await settle();
    const full = http.expectOne(PHOTO.url);
    expect(full.request.responseType).toBe('blob');
    full.flush(new Blob([new Uint8Array(8)], { type: 'image/png' }));
    await settle();
    const dialog = document.querySelector('dm-file-viewer')!;
    expect(dialog.querySelector<HTMLImageElement>('img.full')?.src).toMatch(/^blob:/);
    expect(dialog.querySelector('.caption')?.textContent).toBe('Under the chassis, output stage');
    expect(dialog.querySelector('.name')?.textContent).toBe('under chassis.png');
    expect(dialog.querySelector('.size')?.textContent).toBe(`${sizeText(20480)} · 640 × 400 px`);
    const download = dialog.querySelector<HTMLAnchorElement>('a[download]')!;
    expect(download.getAttribute('download')).toBe('under chassis.png');
    expect(download.href).toMatch(/^blob:/);
    // A reader cannot change or delete.
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Delete/ }))).toBeNull();
  });

  it('lets the owner change the caption (PATCH with the caption only) and refuses markup before sending', async () => {
    await open([PHOTO], { canEdit: true });
    http.expectOne(PHOTO.thumbnailUrl!).flush(thumbBlob());
    await settle();
    el().querySelector<HTMLButtonElement>('li.file button')!.click();
    await settle();
    http.expectOne(PHOTO.url).flush(new Blob([new Uint8Array(8)], { type: 'image/png' }));
    await settle();
    const input = await loader.getHarness(MatInputHarness.with({ selector: '[formcontrolname=caption]' }));
    await input.setValue('Dial <b>lamp</b>');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    await settle();
    http.expectNone((r) => r.method === 'PATCH');
    expect(document.querySelector('dm-file-viewer mat-error')?.textContent).toContain('no markup');
    await input.setValue('Output stage after the recap');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    await settle();
    const patch = http.expectOne((r) => r.method === 'PATCH' && r.url === PHOTO.url);
    expect(patch.request.body).toEqual({ caption: 'Output stage after the recap' });
    patch.flush({ ...PHOTO, caption: 'Output stage after the recap' });
    await settle();
    expect(el().querySelector('li.file .caption')?.textContent?.trim()).toBe('Output stage after the recap');
  });

  it('asks before deleting: "Keep it" sends nothing; "Delete" sends the DELETE and the file leaves the strip', async () => {
    await open([PHOTO, SCHEMATIC], { canEdit: true });
    http.expectOne(PHOTO.thumbnailUrl!).flush(thumbBlob());
    await settle();
    el().querySelector<HTMLButtonElement>('li.file button')!.click();
    await settle();
    http.expectOne(PHOTO.url).flush(new Blob([new Uint8Array(8)], { type: 'image/png' }));
    await settle();

    await (await loader.getHarness(MatButtonHarness.with({ text: /Delete/ }))).click();
    await settle();
    expect((await loader.getAllHarnesses(MatDialogHarness)).length).toBe(2);
    expect(document.querySelector('dm-confirm-file-delete')?.textContent).toContain('cannot be undone');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Keep it' }))).click();
    await settle();
    http.expectNone((r) => r.method === 'DELETE');
    expect(el().querySelectorAll('li.file').length).toBe(2);

    await (await loader.getHarness(MatButtonHarness.with({ text: /Delete/ }))).click();
    await settle();
    // The newest confirmation (the first may still be closing).
    const confirms = document.querySelectorAll('dm-confirm-file-delete');
    Array.from(confirms[confirms.length - 1].querySelectorAll<HTMLButtonElement>('button')).find((b) => b.textContent?.trim() === 'Delete')!.click();
    await settle();
    (await nextRequest(http, (r) => r.method === 'DELETE' && r.url === PHOTO.url)).flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(Array.from(el().querySelectorAll<HTMLElement>('li.file')).map((t) => t.dataset['fileId'])).toEqual(['2']);
    // The viewer closes (after its closing animation).
    for (let i = 0; i < 50 && document.querySelector('dm-file-viewer'); i++) await nextTask(20);
    expect(document.querySelector('dm-file-viewer')).withContext('the viewer closes').toBeNull();
  });
});
