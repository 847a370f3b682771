import { HttpEventType } from '@angular/common/http';
import { HttpTestingController } from '@angular/common/http/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatInputHarness } from '@angular/material/input/testing';
import { clearAuthStorage, nextRequest, nextTask } from '../../../../testing/http-testing';
import type { SetPhoto } from '../../set-photos-api';
import { configureBed } from '../../testing/section-bed';
import { PhotosSection } from './photos-section';

const photo = (over: Partial<SetPhoto> & Pick<SetPhoto, 'id'>): SetPhoto => ({
  setId: 5,
  caption: '',
  readingId: null,
  testPointKey: null,
  surveyId: null,
  name: `photo-${over.id}.jpg`,
  mimeType: 'image/jpeg',
  bytes: 48_000,
  uploadedBy: { id: 7, name: 'Ada Voss' },
  createdAt: '2026-03-02T10:00:00Z',
  url: `/api/sets/5/files/${over.id}`,
  thumbnailUrl: `/api/sets/5/files/${over.id}/thumbnail`,
  ...over,
});

const FRONT = photo({ id: 1, caption: 'Cabinet front at intake' });
const R2 = photo({ id: 2, caption: 'R2 body scorched', readingId: 101, testPointKey: 'tp-r2', surveyId: 31 });

/** A few bytes standing in for a WebP thumbnail (the grid only turns it into an object URL). */
const thumbBlob = () => new Blob([new Uint8Array([0x52, 0x49, 0x46, 0x46])], { type: 'image/webp' });

describe('PhotosSection', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<PhotosSection>;
  let loader: HarnessLoader;
  const el = () => fixture.nativeElement as HTMLElement;
  const tiles = () => Array.from(el().querySelectorAll<HTMLElement>('li.photo'));

  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    TestBed.inject(MatDialog).closeAll();
    http.verify();
    clearAuthStorage();
  });

  async function settle(): Promise<void> {
    await fixture.whenStable();
    await nextTask();
    await fixture.whenStable();
  }

  /** Mounts the section for set 5, answers the list, and the thumbnails of `items`. */
  async function open(items: SetPhoto[]): Promise<void> {
    fixture = TestBed.createComponent(PhotosSection);
    fixture.componentRef.setInput('setId', 5);
    loader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await settle();
    (await nextRequest(http, '/api/sets/5/files')).flush({ setId: 5, items });
    await settle();
    for (const p of items) {
      const t = http.expectOne(p.thumbnailUrl!);
      expect(t.request.responseType).toBe('blob');
      t.flush(thumbBlob());
    }
    await settle();
  }

  function choose(input: HTMLInputElement, files: File[]): void {
    const dt = new DataTransfer();
    for (const f of files) dt.items.add(f);
    input.files = dt.files;
    input.dispatchEvent(new Event('change'));
  }

  it('shows a grid of thumbnails fetched as blobs, with captions and the test point of a linked reading', async () => {
    await open([FRONT, R2]);
    expect(tiles().map((t) => t.dataset['photoId'])).toEqual(['1', '2']);
    expect(tiles().every((t) => /^blob:/.test(t.querySelector<HTMLImageElement>('img.thumb')?.src ?? ''))).toBeTrue();
    expect(tiles()[0].querySelector('.caption')?.textContent?.trim()).toBe('Cabinet front at intake');
    expect(tiles()[0].querySelector('.reading')).withContext('not attached to a reading').toBeNull();
    expect(tiles()[1].querySelector('.reading')?.textContent).toContain('Test point tp-r2');
    expect(tiles()[1].querySelector<HTMLAnchorElement>('.reading a')?.getAttribute('href')).toBe('/surveys/31');
    expect(tiles()[1].querySelector('button.tile')?.getAttribute('aria-label')).toBe('R2 body scorched, test point tp-r2 (46.9 KiB): open at full size');
    expect(el().textContent).not.toContain('No photos yet.');
  });

  it('says so when there is no photo, and offers the camera (image/*, capture) and the file picker (JPEG, PNG, WebP)', async () => {
    await open([]);
    expect(el().textContent).toContain('No photos yet.');
    const camera = el().querySelector<HTMLInputElement>('input.camera')!;
    expect(camera.getAttribute('accept')).toBe('image/*');
    expect(camera.hasAttribute('capture')).toBeTrue();
    const files = el().querySelector<HTMLInputElement>('input.files')!;
    expect(files.getAttribute('accept')).toBe('image/jpeg,image/png,image/webp');
    expect(files.multiple).toBeTrue();
  });

  it('uploads as multipart with the caption and shows the progress; a refusal shows the API message; the next photo is taken, joins the grid and its thumbnail is fetched', async () => {
    await open([FRONT]);
    const caption = await loader.getHarness(MatInputHarness.with({ selector: '.new-caption input' }));
    await caption.setValue('Back of the chassis');

    choose(el().querySelector<HTMLInputElement>('input.files')!, [new File([new Uint8Array(64)], 'notes.pdf', { type: 'application/pdf' })]);
    await settle();
    const refused = http.expectOne((r) => r.method === 'POST' && r.url === '/api/sets/5/files');
    const body = refused.request.body as FormData;
    expect(body instanceof FormData).toBeTrue();
    expect(body.get('caption')).toBe('Back of the chassis');
    expect((body.get('file') as File).name).toBe('notes.pdf');
    expect(body.has('readingId')).toBeFalse();
    refused.event({ type: HttpEventType.UploadProgress, loaded: 16, total: 64 });
    await settle();
    expect(el().querySelector('.progress')?.textContent).toContain('Uploading notes.pdf · 25 %');
    refused.flush(
      { error: { code: 'unsupported-file-type', message: "This file is of type application/pdf; a set's photos are JPEG, PNG or WebP images.", details: { field: 'file' } } },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle();
    expect(el().querySelector('.upload-error')?.textContent).toContain("notes.pdf: This file is of type application/pdf; a set's photos are JPEG, PNG or WebP images.");
    expect(el().querySelector('.progress')).toBeNull();
    expect(tiles().length).toBe(1);
    expect(await caption.getValue()).withContext('the caption is kept for the retry').toBe('Back of the chassis');

    // The twin, from the camera: taken, in the grid with its caption, the caption field emptied.
    choose(el().querySelector<HTMLInputElement>('input.camera')!, [new File([new Uint8Array(64)], 'IMG_0042.jpg', { type: 'image/jpeg' })]);
    await settle();
    const ok = http.expectOne((r) => r.method === 'POST' && r.url === '/api/sets/5/files');
    expect((ok.request.body as FormData).get('caption')).toBe('Back of the chassis');
    expect(el().querySelector('.upload-error')).withContext('the old refusal is cleared').toBeNull();
    ok.flush(photo({ id: 9, name: 'IMG_0042.jpg', caption: 'Back of the chassis' }), { status: 201, statusText: 'Created' });
    await settle();
    http.expectOne('/api/sets/5/files/9/thumbnail').flush(thumbBlob());
    await settle();
    expect(tiles().map((t) => t.dataset['photoId'])).toEqual(['1', '9']);
    expect(tiles()[1].querySelector('.caption')?.textContent?.trim()).toBe('Back of the chassis');
    expect(await caption.getValue()).toBe('');
  });

  it('edits a caption (PATCH with the caption only), refusing markup before sending', async () => {
    await open([FRONT, R2]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Edit caption of R2 body scorched/ }))).click();
    await settle();
    const input = await loader.getHarness(MatInputHarness.with({ selector: '.caption-field input' }));
    expect(await input.getValue()).toBe('R2 body scorched');
    await input.setValue('R2 <b>scorched</b>');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    await settle();
    http.expectNone((r) => r.method === 'PATCH');
    expect(el().querySelector('.edit .problem')?.textContent).toContain('no markup');

    await input.setValue('  R2 body scorched, reads 310k  ');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    await settle();
    const patch = http.expectOne((r) => r.method === 'PATCH' && r.url === '/api/sets/5/files/2');
    expect(patch.request.body).toEqual({ caption: 'R2 body scorched, reads 310k' });
    patch.flush({ ...R2, caption: 'R2 body scorched, reads 310k' });
    await settle();
    expect(el().querySelector('.edit')).toBeNull();
    expect(tiles()[1].querySelector('.caption')?.textContent?.trim()).toBe('R2 body scorched, reads 310k');
    expect(tiles()[1].querySelector('.reading')?.textContent).withContext('still attached').toContain('tp-r2');
  });

  it('deletes only after the confirmation: "Keep it" sends nothing, "Delete" removes the photo', async () => {
    await open([FRONT, R2]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /^Delete Cabinet front at intake/ }))).click();
    await settle();
    expect(document.querySelector('dm-confirm-photo-delete')?.textContent).toContain('“Cabinet front at intake” is removed from the set');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Keep it' }))).click();
    // Wait until the dialog has closed (its answer comes after the exit animation), then look.
    for (let i = 0; i < 100 && document.querySelector('dm-confirm-photo-delete'); i++) await nextTask(20);
    expect(document.querySelector('dm-confirm-photo-delete')).toBeNull();
    await settle();
    http.expectNone((r) => r.method === 'DELETE');
    expect(tiles().length).toBe(2);

    await (await loader.getHarness(MatButtonHarness.with({ text: /^Delete Cabinet front at intake/ }))).click();
    await settle();
    await (await loader.getHarness(MatButtonHarness.with({ selector: 'dm-confirm-photo-delete button', text: 'Delete' }))).click();
    await settle();
    // The dialog answers once it has closed (after its exit animation).
    (await nextRequest(http, (r) => r.method === 'DELETE' && r.url === '/api/sets/5/files/1')).flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(tiles().map((t) => t.dataset['photoId'])).toEqual(['2']);
  });

  it('opens the photo at full size from a blob on a click, with its reading, who added it, and a Download link', async () => {
    await open([R2]);
    el().querySelector<HTMLButtonElement>('li.photo button.tile')!.click();
    await settle();
    const full = http.expectOne(R2.url);
    expect(full.request.responseType).toBe('blob');
    full.flush(new Blob([new Uint8Array(8)], { type: 'image/jpeg' }));
    await settle();
    const dialog = document.querySelector('dm-photo-viewer')!;
    expect(dialog.querySelector<HTMLImageElement>('img.full')?.src).toMatch(/^blob:/);
    expect(dialog.querySelector<HTMLImageElement>('img.full')?.alt).toBe('R2 body scorched');
    expect(dialog.querySelector('.reading')?.textContent).toBe('Test point tp-r2');
    expect(dialog.querySelector('.added')?.textContent).toContain('by Ada Voss');
    const download = dialog.querySelector<HTMLAnchorElement>('a[download]')!;
    expect(download.getAttribute('download')).toBe('photo-2.jpg');
    expect(download.href).toMatch(/^blob:/);
  });

  it('says when the list cannot be loaded', async () => {
    fixture = TestBed.createComponent(PhotosSection);
    fixture.componentRef.setInput('setId', 5);
    await settle();
    (await nextRequest(http, '/api/sets/5/files')).flush({ error: { code: 'not-found', message: 'No such set.' } }, { status: 404, statusText: 'Not Found' });
    await settle();
    expect(el().textContent).toContain('The photos could not be loaded: No such set.');
    expect(el().textContent).not.toContain('No photos yet.');
  });
});
