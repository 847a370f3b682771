import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { clearAuthStorage, nextTask, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { TemplateView } from '../templates-api';
import { sampleDocument, view } from '../testing/template-fixtures';
import { ImportDialog } from './import-dialog';

/** A page for the dialog to open over (the harnesses need a fixture). */
@Component({ selector: 'dm-host', template: '' })
class Host {}

describe('ImportDialog', () => {
  let http: HttpTestingController;
  let root: HarnessLoader;
  let closed: Promise<TemplateView | undefined>;

  beforeEach(async () => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['author'], 1, 7));
    const ref = TestBed.inject(MatDialog).open<ImportDialog, void, TemplateView>(ImportDialog);
    closed = firstValueFrom(ref.afterClosed());
    root = TestbedHarnessEnvironment.documentRootLoader(TestBed.createComponent(Host));
    await nextTask();
  });

  afterEach(() => {
    http.verify();
    TestBed.inject(MatDialog).closeAll();
    clearAuthStorage();
  });

  const text = () => document.querySelector('mat-dialog-container')?.textContent ?? '';

  async function paste(json: string): Promise<void> {
    const inputs = await root.getAllHarnesses(MatInputHarness.with({ selector: 'mat-dialog-container textarea' }));
    await inputs[0].setValue(json);
    await (await root.getHarness(MatButtonHarness.with({ text: 'Import', selector: 'mat-dialog-container button' }))).click();
  }

  it('shows every problem the API finds with its JSON path, and says nothing was imported', async () => {
    const doc = sampleDocument();
    await paste(JSON.stringify(doc));
    const req = http.expectOne('/api/templates/import');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ document: doc });
    req.flush(
      {
        error: {
          code: 'validation',
          message: 'The template has 2 problems: "document.components[1].nodes[1]" names no node.',
          details: {
            field: 'document.components[1].nodes[1]',
            problems: [
              { path: 'document.components[1].nodes[1]', message: 'names no node of this chassis.' },
              { path: 'document.testPoints[2].tolerancePct', message: 'must be <= 100' },
            ],
          },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await nextTask();
    expect(text()).toContain('2 problems found. Nothing was imported.');
    const items = Array.from(document.querySelectorAll('mat-dialog-container .problems li')).map((li) => li.textContent?.trim());
    expect(items).toEqual(['components[1].nodes[1] — names no node of this chassis.', 'testPoints[2].tolerancePct — must be <= 100']);
  });

  it('imports a valid document and closes with the new template', async () => {
    await paste(JSON.stringify(sampleDocument()));
    http.expectOne('/api/templates/import').flush(view({ id: 31, own: true, canEdit: true }), { status: 201, statusText: 'Created' });
    expect((await closed)?.id).toBe(31);
  });

  it('refuses text that is not JSON without asking the API', async () => {
    await paste('{"format": "driftmark-template",');
    await nextTask();
    http.expectNone('/api/templates/import');
    expect(text()).toContain('This is not JSON');
    expect(text()).toContain('Nothing was imported.');
  });
});
