/**
 * A class survey from the student's side, end to end on the demo class (issue #6): the
 * predict-first grid (the expectation hidden until a prediction is typed, then the measured
 * value; both stored; verdicts hidden while measuring), submitting, the returned survey taking
 * readings only at the requested test point (the new reading following the submitted one), the
 * resubmission, and the reference survey — refused (404) before acceptance, readable after.
 * The instructor's decisions go through the API here (the review page has its own e2e spec).
 */
import type { Page } from 'playwright-core';
import { apiSignIn, DEMO, newContext, signIn, url } from '../support/e2e-env';

const CLASS = 'Bench practice I';
const PREDICT = 'Predict, then measure: Larkspur 7-P front end';

interface Api {
  get<T>(path: string): Promise<{ status: number; body: T }>;
  post<T>(path: string, body: unknown): Promise<{ status: number; body: T }>;
}

async function api(email: string): Promise<Api> {
  const s = await apiSignIn(email);
  const headers = { 'content-type': 'application/json', authorization: `Bearer ${s.accessToken}` };
  return {
    async get<T>(path: string) {
      const r = await fetch(url(path), { headers });
      return { status: r.status, body: (await r.json()) as T };
    },
    async post<T>(path: string, body: unknown) {
      const r = await fetch(url(path), { method: 'POST', headers, body: JSON.stringify(body) });
      return { status: r.status, body: (await r.json()) as T };
    },
  };
}

interface Reading {
  id: number;
  testPointKey: string;
  text: string;
  prediction: string | null;
  followsReadingId: number | null;
}

const inputs = (page: Page) => page.locator('input.reading-input');
const rowOf = (page: Page, key: string) => page.locator('tr', { has: page.locator(`input[data-key="${key}"]`) });

describe('A class survey, from the student side', () => {
  it('predicts then measures, submits, re-measures only what was asked, and reads the reference once accepted', async () => {
    const student = await api(DEMO.student);
    const instructor = await api(DEMO.instructor);
    const classes = await student.get<{ items: { id: number; name: string }[] }>('/api/classes');
    const klass = classes.body.items.find((c) => c.name === CLASS)!;
    const detail = await student.get<{ assignments: { id: number; title: string; mySurveyId: number | null; myStatus: string }[] }>(`/api/classes/${klass.id}`);
    const assignment = detail.body.assignments.find((a) => a.title === PREDICT)!;
    expect(assignment.myStatus).toBe('draft');
    const surveyId = assignment.mySurveyId!;
    const referenceId = (await instructor.get<{ referenceSurveyId: number }>(`/api/assignments/${assignment.id}`)).body.referenceSurveyId;
    expect(referenceId).toBeGreaterThan(0);
    // Before acceptance the reference is a 404 to the student (the instructor reads it).
    expect((await student.get(`/api/surveys/${referenceId}`)).status).toBe(404);
    expect((await instructor.get(`/api/surveys/${referenceId}`)).status).toBe(200);

    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.student);
    await page.goto(url(`/assignments/${assignment.id}`));
    await page.getByRole('link', { name: /Continue the survey/ }).click();
    await page.waitForURL(`**/surveys/${surveyId}`);
    await page.getByText(PREDICT).first().waitFor();

    // Predict first: the first unread row asks for a prediction with its expectation hidden.
    const predicting = inputs(page).and(page.locator('.predict')).first();
    await predicting.waitFor();
    const key = (await predicting.getAttribute('data-key'))!;
    const row = rowOf(page, key);
    await row.locator('[data-test="concealed"]').waitFor();
    expect(await row.locator('[data-test="predict-label"]').isVisible()).toBeTrue();
    await predicting.focus();
    await page.keyboard.type('10k');
    await page.keyboard.press('Enter');
    // The expectation shows; the same field now takes the measured value.
    await row.locator('[data-test="predicted"]').waitFor();
    expect(await row.locator('[data-test="concealed"]').count()).toBe(0);
    await page.keyboard.type('12k');
    await page.keyboard.press('Enter');
    await row.locator('[data-mark="saved"]').waitFor();
    // Verdicts hidden while measuring: the row shows that it is saved, not a verdict.
    expect(await row.locator('dm-verdict-badge').count()).toBe(0);
    const stored = async () => (await student.get<{ readings: Reading[] }>(`/api/surveys/${surveyId}`)).body.readings;
    const mine = (await stored()).filter((r) => r.testPointKey === key);
    expect(mine.map((r) => [r.prediction, r.text])).toEqual([['10k', '12k']]);

    // Submit (points are still unread: the dialog says so and offers "Submit anyway").
    await page.locator('[data-test="submit"]').click();
    await page.locator('[data-test="submit-confirm"]').click();
    await page.getByText(/Submitted: the survey is read-only/).waitFor();
    expect(await predicting.count()).toBe(0);

    // The instructor returns it asking for this one test point again.
    const attempts = await instructor.get<{ items: { id: number; surveyId: number; number: number }[] }>(`/api/assignments/${assignment.id}/attempts`);
    const first = attempts.body.items.filter((t) => t.surveyId === surveyId).sort((a, b) => b.number - a.number)[0];
    const returned = await instructor.post(`/api/attempts/${first.id}/review`, { decision: 'returned', score: 40, comment: 'Measure this one again, hands off the probes.', remeasureKeys: [key] });
    expect(returned.status).withContext(JSON.stringify(returned.body)).toBe(200);

    // The student's grid: the banner names the point; only that row takes input.
    await page.reload();
    await page.locator('[data-test="remeasure"]').waitFor();
    await page.locator(`[data-requested="${key}"]`).waitFor();
    const other = (await inputs(page).evaluateAll((els, k) => els.map((e) => e.getAttribute('data-key')).filter((x) => x !== k), key))[0]!;
    expect(await page.locator(`input[data-key="${other}"]`).isEditable()).toBeFalse();
    await rowOf(page, other).locator('[data-test="locked"]').waitFor();
    const requested = page.locator(`input[data-key="${key}"]`);
    expect(await requested.isEditable()).toBeTrue();
    await requested.focus();
    await page.keyboard.type('10k2');
    await page.keyboard.press('Enter');
    // The re-measure reaches the server as a second reading of the point.
    let both: Reading[] = [];
    for (let i = 0; i < 50 && both.length < 2; i++) {
      both = (await stored()).filter((r) => r.testPointKey === key);
      if (both.length < 2) await new Promise((res) => setTimeout(res, 200));
    }
    expect(both.length).withContext('the re-measure arrived').toBe(2);
    expect(both[1].text).toBe('10k2');
    expect(both[1].followsReadingId).toBe(both[0].id);

    await page.locator('[data-test="submit"]').click();
    await page.locator('[data-test="submit-confirm"]').click();
    await page.getByText(/Submitted: the survey is read-only/).waitFor();

    // Accepted: now the reference opens for the student, read-only.
    const latest = (await instructor.get<{ items: { id: number; surveyId: number; number: number }[] }>(`/api/assignments/${assignment.id}/attempts`)).body.items
      .filter((t) => t.surveyId === surveyId)
      .sort((a, b) => b.number - a.number)[0];
    expect(latest.number).toBe(first.number + 1);
    const accepted = await instructor.post(`/api/attempts/${latest.id}/review`, { decision: 'accepted', score: 80, comment: 'Good re-measure.', remeasureKeys: [] });
    expect(accepted.status).withContext(JSON.stringify(accepted.body)).toBe(200);
    expect((await student.get(`/api/surveys/${referenceId}`)).status).toBe(200);
    await page.goto(url(`/surveys/${referenceId}`));
    await page.locator('[data-test="reference-note"]').waitFor();
    await page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: PREDICT }).waitFor();
    await inputs(page).first().waitFor();
    expect(await inputs(page).first().isEditable()).toBeFalse();
    expect(watch.pageErrors).toEqual([]);
    expect(watch.csp).toEqual([]);
  });
});
