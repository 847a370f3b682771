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
import { view } from '../testing/template-fixtures';
import { PublishData, PublishDialog } from './publish-dialog';

/** A page for the dialog to open over (the harnesses need a fixture). */
@Component({ selector: 'dm-host', template: '' })
class Host {}

describe('PublishDialog', () => {
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
    const ref = TestBed.inject(MatDialog).open<PublishDialog, PublishData, TemplateView>(PublishDialog, { data: { templateId: 11, nextNumber: 3 } });
    closed = firstValueFrom(ref.afterClosed());
    root = TestbedHarnessEnvironment.documentRootLoader(TestBed.createComponent(Host));
    await nextTask();
  });

  afterEach(() => {
    http.verify();
    TestBed.inject(MatDialog).closeAll();
    clearAuthStorage();
  });

  const dialogText = () => document.querySelector('mat-dialog-container')?.textContent ?? '';

  async function publishWith(changelog: string): Promise<void> {
    await (await root.getHarness(MatInputHarness.with({ selector: 'mat-dialog-container input' }))).setValue(changelog);
    await (await root.getHarness(MatButtonHarness.with({ text: 'Publish', selector: 'mat-dialog-container button' }))).click();
  }

  it("shows the API's 409 message and stays open", async () => {
    await publishWith('Nothing new');
    const req = http.expectOne('/api/templates/11/publish');
    expect(req.request.body).toEqual({ changelog: 'Nothing new' });
    req.flush({ error: { code: 'unchanged', message: 'The draft equals version 2: there is nothing new to publish.', details: { versionNumber: 2 } } }, { status: 409, statusText: 'Conflict' });
    await nextTask();
    expect(document.querySelector('mat-dialog-container [role=alert]')?.textContent).toContain('The draft equals version 2: there is nothing new to publish.');
    expect(dialogText()).toContain('Publish version 3');
  });

  it('publishes with the changelog and closes with the template', async () => {
    await publishWith('  R2 tolerance from the sheet ');
    const req = http.expectOne('/api/templates/11/publish');
    expect(req.request.body).toEqual({ changelog: 'R2 tolerance from the sheet' });
    req.flush(view({ latestVersion: 3 }), { status: 201, statusText: 'Created' });
    expect((await closed)?.latestVersion).toBe(3);
  });

  it('asks for a changelog before sending anything', async () => {
    await publishWith('   ');
    await nextTask();
    http.expectNone('/api/templates/11/publish');
    expect(dialogText()).toContain('Say what changed in one line.');
  });
});
