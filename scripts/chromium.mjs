// Finds the Chromium that end-to-end tests drive: CHROMIUM_PATH, else Debian's /usr/bin/chromium.
// As root with apt-get, a missing Chromium is installed from Debian's packages; otherwise we stop
// with instructions. Browser tests are never skipped silently.
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';

export function ensureChromium() {
	const wanted = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
	if (fs.existsSync(wanted)) return wanted;
	if (process.env.CHROMIUM_PATH) throw new Error(`CHROMIUM_PATH points at ${wanted}, which does not exist.`);
	const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
	const hasApt = spawnSync('sh', ['-c', 'command -v apt-get']).status === 0;
	if (!isRoot || !hasApt) {
		throw new Error(
			'Chromium is needed for the browser tests and was not found at /usr/bin/chromium.\n' +
				'Install it with `sudo apt-get install chromium` (Debian/Ubuntu), or set CHROMIUM_PATH to a Chromium binary.'
		);
	}
	console.log('Installing Debian chromium for the browser tests…');
	execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
	execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], {
		stdio: 'inherit',
		env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
	});
	if (!fs.existsSync(wanted)) throw new Error('apt-get finished but /usr/bin/chromium is still missing.');
	return wanted;
}

export const chromiumArgs = [
	'--headless',
	'--no-sandbox',
	'--disable-gpu',
	'--disable-quic',
	'--no-first-run',
	'--disable-background-networking',
	'--disable-component-update',
	'--disable-sync'
];
