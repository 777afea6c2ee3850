import { expect, test } from '@playwright/test';
import { accounts, password, signIn } from './helpers';

test('an anonymous visitor is sent to the sign-in page', async ({ page }) => {
	await page.goto('/staff');
	await expect(page).toHaveURL(/\/signin\?next=%2Fstaff/);
	await expect(page.getByRole('heading', { name: 'Sign in to the bench' })).toBeVisible();
});

test('wrong credentials get one generic message, whether or not the e-mail exists', async ({ page }) => {
	await page.goto('/signin');
	for (const email of [accounts.tech, 'nobody@tidemark.test']) {
		await page.getByLabel('E-mail').fill(email);
		await page.getByLabel('Password').fill('not-the-password');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page.getByRole('alert')).toHaveText('That e-mail and password do not match an account.');
	}
	await page.getByLabel('E-mail').fill('not-an-email');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByText('Enter the e-mail address you sign in with.')).toBeVisible();
});

test('each role sees its own navigation', async ({ browser }) => {
	const expected = {
		tech: ['Today', 'Jobs', 'Library'],
		senior: ['Today', 'Jobs', 'Library'],
		lead: ['Today', 'Jobs', 'Library', 'Staff']
	} as const;
	for (const who of ['tech', 'senior', 'lead'] as const) {
		const page = await (await browser.newContext()).newPage();
		await signIn(page, who);
		const nav = page.getByRole('navigation', { name: 'Main' });
		for (const label of expected[who]) await expect(nav.getByRole('link', { name: label })).toBeVisible();
		if (who !== 'lead') await expect(nav.getByRole('link', { name: 'Staff' })).toHaveCount(0);
		await page.context().close();
	}
});

test('a technician gets 403 on staff admin', async ({ page }) => {
	await signIn(page, 'tech');
	const response = await page.goto('/staff');
	expect(response?.status()).toBe(403);
	await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible();
});

test('the lead manages staff: add, bad input, role, disable, last lead kept', async ({ page, browser }) => {
	await signIn(page, 'lead', '/staff');
	await expect(page.getByRole('heading', { name: 'Staff', exact: true })).toBeVisible();
	const add = page.getByRole('region', { name: 'Add a staff member' });

	// Weak password and duplicate e-mail are refused at the field.
	await add.getByLabel('Name').fill('Rhea Lindqvist');
	await add.getByLabel('E-mail').fill(accounts.senior);
	await add.getByLabel('Temporary password').fill('short');
	await add.getByRole('button', { name: 'Add staff member' }).click();
	await expect(add.getByText('Use at least 10 characters.')).toBeVisible();
	await add.getByLabel('Temporary password').fill('temporary-pass-1');
	await add.getByRole('button', { name: 'Add staff member' }).click();
	await expect(add.getByText('Someone on the staff already uses this e-mail address.')).toBeVisible();

	await add.getByLabel('E-mail').fill('rhea@tidemark.test');
	await add.getByLabel('Role').selectOption('senior');
	await add.getByLabel('Temporary password').fill('temporary-pass-1');
	await add.getByRole('button', { name: 'Add staff member' }).click();
	await expect(add.getByText(/Rhea Lindqvist was added/)).toBeVisible();
	const row = page.getByTestId('staff-row').filter({ hasText: 'rhea@tidemark.test' });
	await expect(row).toBeVisible();

	// The last active lead cannot be demoted or disabled: the controls say so and the server refuses.
	const leadRow = page.getByTestId('staff-row').filter({ hasText: accounts.lead });
	await expect(leadRow.getByRole('combobox')).toBeDisabled();
	const refused = await page.request.post('/staff?/role', {
		form: { id: await leadRow.locator('input[name=id]').first().inputValue(), role: 'technician' },
		headers: { origin: new URL(page.url()).origin, 'x-sveltekit-action': 'true' }
	});
	expect(await refused.text()).toContain('last active shop lead');

	// Change the new member's role, then disable them: they can no longer sign in.
	await row.getByRole('combobox').selectOption('technician');
	await row.getByRole('button', { name: 'Save' }).click();
	await expect(row.getByText('Role changed to technician.')).toBeVisible();
	await row.getByRole('button', { name: 'Disable' }).click();
	await expect(row.getByText('Disabled: they can no longer sign in.')).toBeVisible();

	const other = await (await browser.newContext()).newPage();
	await other.goto('/signin');
	await other.getByLabel('E-mail').fill('rhea@tidemark.test');
	await other.getByLabel('Password').fill('temporary-pass-1');
	await other.getByRole('button', { name: 'Sign in' }).click();
	await expect(other.getByRole('alert')).toContainText('disabled');

	// Enabled again, a temporary password leads to choosing one's own.
	await row.getByRole('button', { name: 'Enable' }).click();
	await expect(row.getByText('Enabled again.')).toBeVisible();
	await other.getByLabel('Password').fill('temporary-pass-1');
	await other.getByRole('button', { name: 'Sign in' }).click();
	await expect(other).toHaveURL(/\/account\?first=1/);
	await expect(other.getByText('You signed in with a temporary password')).toBeVisible();
	await other.context().close();

	// Every change is in the audit list.
	await page.reload();
	const audit = page.getByRole('region', { name: 'Recent changes' });
	for (const words of [
		'added a staff member',
		'changed a role',
		'disabled an account',
		'enabled an account'
	]) {
		await expect(audit.getByText(words).first()).toBeVisible();
	}
});

test('the theme switch is remembered across pages', async ({ page }) => {
	await signIn(page, 'tech');
	await expect(page.locator('html')).toHaveClass(/light/);
	await page.getByRole('button', { name: /bench dark/i }).click();
	await expect(page.locator('html')).toHaveClass(/dark/);
	await page.reload();
	await expect(page.locator('html')).toHaveClass(/dark/);
});

test('health is public and pages carry the security headers', async ({ request }) => {
	const health = await request.get('/api/health');
	expect(await health.json()).toEqual({ ok: true, db: 'pglite', version: expect.any(String) });
	const page = await request.get('/signin');
	const headers = page.headers();
	expect(headers['content-security-policy']).toContain("frame-ancestors 'none'");
	expect(headers['x-content-type-options']).toBe('nosniff');
	expect(headers['referrer-policy']).toBe('same-origin');
	expect(headers['x-frame-options']).toBe('DENY');
	// An API call without a session is refused with JSON, not a redirect.
	const refused = await request.post('/api/jobs', { data: {} });
	expect(refused.status()).toBe(401);
	expect(refused.headers()['content-type']).toContain('application/json');
});

test('sign-out ends the session', async ({ page }) => {
	await signIn(page, 'senior');
	await page.getByRole('button', { name: 'Sign out' }).click();
	await expect(page).toHaveURL(/\/signin/);
	await page.goto('/');
	await expect(page).toHaveURL(/\/signin/);
	expect(password).toBeTruthy();
});
