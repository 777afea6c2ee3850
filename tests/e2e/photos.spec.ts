import { expect, test } from '@playwright/test';
import sharp from 'sharp';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';
import { signIn } from './helpers';

/** A small photo made on the spot: left half copper-red, right half teal. */
async function testPhoto() {
	const left = await sharp({ create: { width: 320, height: 480, channels: 3, background: '#b0502a' } })
		.png()
		.toBuffer();
	return sharp({ create: { width: 640, height: 480, channels: 3, background: '#2f8075' } })
		.composite([{ input: left, left: 0, top: 0 }])
		.jpeg()
		.toBuffer();
}

/** Takes in a fresh job through the API (signed in as the technician) and opens its page. */
async function openNewJob(page: import('@playwright/test').Page) {
	await signIn(page, 'tech', '/jobs');
	const body14 = `0066${String(Date.now()).slice(-10)}`; // invented "00" test IMEI body
	const res = await page.request.post('/api/jobs', {
		data: {
			customerName: 'Tamsin Grell',
			customerPhone: '+00 555 0166',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: `${body14}${imeiCheckDigit(body14)}`,
			symptoms: ['restart-loop'],
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'withheld',
			consentToOpen: true
		}
	});
	expect(res.status()).toBe(201);
	const { id } = (await res.json()) as { id: string };
	await page.goto(`/jobs/${id}`);
	return page.locator('[data-section="photos"]');
}

test('a technician adds a photo to a job, sees its thumbnail and zooms in', async ({ page }) => {
	const section = await openNewJob(page);
	const before = await section.getByTestId('photo-tile').count();
	await section.locator('label', { hasText: 'Microscope camera' }).click(); // the radio itself is visually hidden in its label
	await section.getByLabel(/Caption/).fill('Residue beside the battery connector');
	await section.getByTestId('photo-file-input').setInputFiles({
		name: 'bench-shot.jpg',
		mimeType: 'image/jpeg',
		buffer: await testPhoto()
	});
	await expect(section.getByTestId('upload-item').filter({ hasText: 'bench-shot.jpg' })).toContainText(
		'Uploaded.'
	);
	const tiles = section.getByTestId('photo-tile');
	await expect(tiles).toHaveCount(before + 1);
	const tile = tiles.last();
	await expect(tile).toContainText('Residue beside the battery connector');
	// The thumbnail really loaded through the signed-in image route.
	const img = tile.getByRole('img');
	await expect(img).toHaveAttribute('src', /^\/photos\/[0-9a-f-]{36}\/thumb$/);
	await img.scrollIntoViewIfNeeded(); // thumbnails load lazily
	await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth)).toBe(480);

	await tile.getByRole('button').click();
	const dialog = page.getByRole('dialog');
	await expect(dialog).toContainText('Microscope camera');
	await expect
		.poll(() => dialog.getByRole('img').evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth))
		.toBe(640);
	await page.keyboard.press('Escape');
	await expect(dialog).toHaveCount(0);

	// Still there after a reload: it was stored, not just shown.
	await page.reload();
	await expect(page.locator('[data-section="photos"]').getByTestId('photo-tile')).toHaveCount(before + 1);
});

test('a file that is not an image is refused with its reason, whatever its name', async ({ page }) => {
	const section = await openNewJob(page);
	const before = await section.getByTestId('photo-tile').count();
	await section.getByTestId('photo-file-input').setInputFiles({
		name: 'looks-like-a-photo.jpg',
		mimeType: 'image/jpeg',
		buffer: Buffer.from('Customer notes: phone fell in the sink on Tuesday.\n'.repeat(20))
	});
	const item = section.getByTestId('upload-item').filter({ hasText: 'looks-like-a-photo.jpg' });
	await expect(item).toHaveAttribute('data-state', 'failed');
	await expect(item.getByRole('alert')).toContainText('not an image, whatever its name says');
	await expect(section.getByTestId('photo-tile')).toHaveCount(before);
});

test('photos are not served to a signed-out visitor', async ({ page, request }) => {
	const section = await openNewJob(page);
	await section.getByTestId('photo-file-input').setInputFiles({
		name: 'private.jpg',
		mimeType: 'image/jpeg',
		buffer: await testPhoto()
	});
	await expect(section.getByTestId('upload-item').filter({ hasText: 'private.jpg' })).toContainText(
		/Uploaded|Already here/
	);
	const src = await section.getByTestId('photo-tile').last().getByRole('img').getAttribute('src');
	expect(src).toMatch(/^\/photos\//);
	const signedIn = await page.request.get(src!);
	expect(signedIn.status()).toBe(200);
	expect(signedIn.headers()['x-content-type-options']).toBe('nosniff');
	// `request` carries no session cookie.
	const anonymous = await request.get(src!, { maxRedirects: 0 });
	expect(anonymous.status()).toBe(303);
	expect(anonymous.headers()['location']).toMatch(/^\/signin/);
});
