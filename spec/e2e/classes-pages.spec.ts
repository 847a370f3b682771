/**
 * The class screens end to end on the demo class (issue #6): the instructor's class page (results
 * with the agreement chart from its lazy chunk), a new assignment through the form, the submission
 * queue, a review beside the reference (comment, re-measure request, return); the student told in
 * the bell, reading the review without the reference columns; and a student joining from the
 * invitation mail (account created on /join/:token).
 */
import { apiSignIn, DEMO, DEMO_PASSWORD, e2e, linkIn, newContext, signIn, uniqueEmail, url } from '../support/e2e-env';

const CLASS = 'Bench practice I';
const PREDICT = 'Predict, then measure: Larkspur 7-P front end';
const FARID = { email: 'student2@driftmark.example', name: 'Farid Quenneville' };

async function classId(): Promise<number> {
  const s = await apiSignIn(DEMO.instructor);
  const r = await fetch(url('/api/classes'), { headers: { authorization: `Bearer ${s.accessToken}` } });
  const found = ((await r.json()) as { items: { id: number; name: string }[] }).items.find((c) => c.name === CLASS);
  if (!found) throw new Error('no demo class');
  return found.id;
}

describe('The class pages', () => {
  it('show the instructor the results with the agreement chart, and take a new assignment through the form', async () => {
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.instructor);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Classes' }).click();
    await page.getByRole('link', { name: CLASS }).click();
    await page.getByRole('heading', { level: 1, name: CLASS }).waitFor();

    await page.getByRole('tab', { name: 'Results' }).click();
    const table = page.getByRole('table', { name: 'Results: students by assignments' });
    await table.waitFor();
    expect(await table.getByRole('row').count()).toBe(5); // the head and four students
    await page.getByRole('table', { name: 'Agreement with the reference per test point' }).waitFor();
    await page.locator('dm-results-chart canvas').waitFor();

    await page.getByRole('tab', { name: /^Assignments/ }).click();
    await page.getByRole('button', { name: 'New assignment' }).click();
    await page.getByLabel('Title').fill('Re-survey of the trainer');
    await page.getByLabel('Chassis template').click();
    await page.getByRole('option').first().click();
    await page.getByLabel('Training set').click();
    await page.getByRole('option').first().click();
    await page.getByLabel(/^Due/).fill('2031-03-01T18:00');
    await page.getByRole('button', { name: 'Create the assignment' }).click();
    await page.getByRole('status').filter({ hasText: 'Assignment "Re-survey of the trainer" created.' }).waitFor();
    await page.getByRole('table', { name: 'Assignments' }).getByRole('link', { name: 'Re-survey of the trainer' }).waitFor();
    expect(watch.pageErrors).toEqual([]);
    expect(watch.csp).toEqual([]);
  });

  it('let the instructor return a submission with a comment and a re-measure request, and the student read it without the reference', async () => {
    const { context, watch } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.instructor);
    await page.goto(url(`/classes/${await classId()}`));
    await page.getByRole('tab', { name: /^Assignments/ }).click();
    await page.getByRole('link', { name: PREDICT }).click();
    await page.getByRole('heading', { level: 1, name: PREDICT }).waitFor();
    const queue = page.getByRole('table', { name: 'Submission queue' });
    expect(await queue.locator('tr[data-status=submitted]', { hasText: FARID.name }).count()).toBe(1);
    await queue.getByRole('link', { name: `Review of ${FARID.name}` }).click();
    await page.getByRole('heading', { level: 1, name: `Review: ${FARID.name}, attempt 1` }).waitFor();
    const review = page.getByRole('table', { name: 'Readings side by side with the reference' });
    await review.getByRole('columnheader', { name: 'Reference' }).waitFor();
    await review.getByRole('columnheader', { name: 'Prediction' }).waitFor();

    await review.getByRole('button', { name: /^Comment on / }).first().click();
    await page.locator('textarea[data-comment]').fill('Predicted well; now zero the leads before the low ranges.');
    await page.getByRole('button', { name: 'Add', exact: true }).click();
    await review.getByText('Predicted well; now zero the leads before the low ranges.').waitFor();
    await review.getByRole('checkbox').first().check();
    await page.getByLabel('Overall comment').fill('Re-measure the first point, then submit again.');
    await page.getByRole('button', { name: 'Return for re-measure' }).click();
    await page.getByRole('status').filter({ hasText: 'Returned with 1 test point to re-measure.' }).waitFor();
    await page.getByRole('heading', { level: 3, name: 'To re-measure' }).waitFor();
    expect(watch.pageErrors).toEqual([]);

    // The student: told in the bell, the review without the reference, the way back to the survey.
    const { context: c2, watch: w2 } = await newContext();
    const student = await c2.newPage();
    await signIn(student, FARID.email, DEMO_PASSWORD);
    const bell = student.getByRole('button', { name: /^Notifications, \d+ unread$/ });
    await bell.click();
    await student.getByRole('menuitem', { name: /Predict, then measure.*reviewed/ }).first().click();
    await student.getByRole('heading', { level: 1, name: 'Review: your attempt, attempt 1' }).waitFor();
    const mine = student.getByRole('table', { name: 'Readings side by side with the reference' });
    expect(await mine.getByRole('columnheader', { name: 'Reference' }).count()).toBe(0);
    await mine.getByText('Predicted well; now zero the leads before the low ranges.').waitFor();
    await student.getByText('Re-measure the first point, then submit again.').waitFor();
    expect(await student.getByRole('checkbox').count()).toBe(0);
    await student.getByRole('link', { name: 'Re-measure now' }).waitFor();
    // The bell has one unread less; the assignment page offers the way back to the survey too.
    await student.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: PREDICT }).click();
    await student.getByRole('heading', { level: 1, name: PREDICT }).waitFor();
    await student.getByRole('link', { name: 'Re-measure now' }).waitFor();
    await student.getByText('1 test point to re-measure').waitFor();
    expect(w2.pageErrors).toEqual([]);
    expect(w2.csp).toEqual([]);
  });

  it('take a new student from the invitation mail to the class: the account is made on /join/:token', async () => {
    const { context } = await newContext();
    const page = await context.newPage();
    await signIn(page, DEMO.instructor);
    await page.goto(url(`/classes/${await classId()}`));
    const email = uniqueEmail('newstudent');
    await page.getByLabel('E-mail addresses').fill(email);
    await page.getByRole('button', { name: 'Send invitations' }).click();
    await page.getByRole('status').filter({ hasText: 'Invitation sent.' }).waitFor();

    const link = linkIn(await e2e().mail.waitFor(email, /join the class/));
    expect(link.pathname).toMatch(/^\/join\/[A-Za-z0-9_-]+$/);
    const { context: c2, watch } = await newContext();
    const join = await c2.newPage();
    await join.goto(url(link.pathname));
    await join.getByRole('heading', { level: 1, name: 'Join a class' }).waitFor();
    await join.getByText(CLASS).first().waitFor();
    await join.getByLabel('Your name').fill('Noor Vesely');
    await join.getByLabel('Password', { exact: true }).fill('a quiet valve hums');
    await join.getByRole('button', { name: 'Create the account and join' }).click();
    await join.waitForURL(url('/classes'));
    await join.getByRole('link', { name: CLASS }).waitFor();
    expect(watch.pageErrors).toEqual([]);
  });
});
