import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { StudyPage } from './pages/study-page';

// A lead sets a study's protocol and members; an observer member reads it and cannot change it;
// a user who is not a member is told the study is not theirs.
test('a lead edits the protocol and members; an observer reads only', async ({ page, browser }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();

  const name = `Protocol walk ${Date.now()}`;
  const study = new StudyPage(page);
  await study.createStudy(name);
  const studyUrl = page.url();

  await page.getByTestId('study-settings-link').click();
  const form = page.getByTestId('study-form');
  await expect(form.getByLabel("Blinding: raters do not see each other's votes before they submit")).toBeChecked();
  await form.getByLabel('Number of components').selectOption('fixed');
  await page.getByTestId('study-save').click();
  await expect(page.getByTestId('fixedComponents-error')).toContainText('Enter the number of components');
  await form.getByLabel('Components (fixed N)').fill('15');
  await page.getByTestId('study-save').click();
  await expect(page.getByText('The protocol was saved.')).toBeVisible();

  const members = page.getByTestId('member-form');
  await members.getByLabel('E-mail of an existing account').fill(DEMO.observer);
  await members.getByLabel('Study role').selectOption('lead');
  await members.getByRole('button', { name: 'Add member' }).click();
  await expect(page.getByTestId('studyRole-error').or(page.getByText(/cannot be a study lead/))).toBeVisible();
  await members.getByLabel('Study role').selectOption('observer');
  await members.getByRole('button', { name: 'Add member' }).click();
  await expect(page.getByTestId('member-row')).toHaveCount(2);
  await members.getByLabel('E-mail of an existing account').fill('nobody@fernhollow.example');
  await members.getByRole('button', { name: 'Add member' }).click();
  await expect(page.getByTestId('email-error')).toContainText('No active account');

  await page.goto(studyUrl);
  await expect(page.getByText(/Fixed number of components \(15\)/)).toBeVisible();

  // the observer member: the study and its runs, no upload area, the protocol read-only
  const observerContext = await browser.newContext();
  const observer = await observerContext.newPage();
  const observerSignIn = new SignInPage(observer);
  await observerSignIn.open();
  await observerSignIn.signIn(DEMO.observer);
  await expect(observer.getByTestId('home-heading')).toBeVisible();
  await observer.goto(studyUrl);
  await expect(observer.getByTestId('study-name')).toHaveText(name);
  await expect(observer.getByTestId('runs-table')).toBeVisible();
  await expect(observer.getByTestId('upload-area')).toHaveCount(0);
  await observer.getByTestId('study-settings-link').click();
  await expect(observer.getByTestId('study-form')).toHaveCount(0);
  await expect(observer.getByTestId('member-form')).toHaveCount(0);
  await observerContext.close();

  // a rater who is not a member
  const raterContext = await browser.newContext();
  const rater = await raterContext.newPage();
  const raterSignIn = new SignInPage(rater);
  await raterSignIn.open();
  await raterSignIn.signIn(DEMO.rater);
  await expect(rater.getByTestId('home-heading')).toBeVisible();
  await rater.goto(studyUrl);
  await expect(rater.getByText('No such study')).toBeVisible();
  await raterContext.close();
});
