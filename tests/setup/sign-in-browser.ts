import type { Page } from 'playwright-core'

/** Signs in the way a person does: the app's sign-in page, then the stand-in provider's account list. */
export async function signInAs(page: Page, appUrl: string, email: string, path = '/') {
  await page.goto(appUrl + path)
  await page.waitForURL(/\/sign-in/)
  await page.getByRole('button', { name: 'Sign in with company account' }).click()
  await page.getByRole('button', { name: new RegExp(email.replace('.', '\\.')) }).click()
  await page.waitForURL((u) => u.origin === new URL(appUrl).origin && !u.pathname.startsWith('/sign-in') && !u.pathname.startsWith('/auth'))
}
