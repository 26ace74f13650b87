// Frame time of the dial board with 256 qubits while playing, measured in Debian's Chromium
// against the built app. Prints `bench …` lines like the core benches; the baseline is the same
// page's frame interval with nothing changing, measured in the same run.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { loadavg } from 'node:os';
import { chromium } from '@playwright/test';

const port = 4390 + Math.floor(Math.random() * 200);
// Build first when there is no build or the sources changed since (a clean clone has none).
const stale = !existsSync('build/handler.js') ||
	spawnSync('bash', ['-c', 'find src static package-lock.json svelte.config.js vite.config.ts tailwind.config.ts -newer build/handler.js -print -quit'], { encoding: 'utf8' }).stdout.trim() !== '';
if (stale) {
	console.error('bench dials: building the app first (npx vite build)');
	const b = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { stdio: 'inherit' });
	if (b.status !== 0) {
		console.error('bench dials: the build failed');
		process.exit(1);
	}
}
const server = spawn('node', ['build'], { env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: `http://127.0.0.1:${port}`, ORRERY_BENCH_PAGES: '1' }, stdio: 'ignore' });
const stop = () => server.kill();
try {
	for (let i = 0; i < 100; i++) {
		try {
			const r = await fetch(`http://127.0.0.1:${port}/`);
			if (r.ok) break;
		} catch {
			/* not up yet */
		}
		await new Promise((r) => setTimeout(r, 100));
	}
	const browser = await chromium.launch({
		executablePath: '/usr/bin/chromium',
		args: ['--no-sandbox', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic', '--use-angle=swiftshader', '--enable-unsafe-swiftshader']
	});
	// bypassCSP: the pages forbid eval, and the measuring code below is handed over as text.
	const page = await browser.newPage({ viewport: { width: 1400, height: 900 }, bypassCSP: true });
	// Written as text: tsx would wrap a function literal with helpers the page does not have.
	const MEASURE = `(ms) => new Promise((done) => {
		const xs = [];
		let last = performance.now();
		const end = last + ms;
		const f = (t) => {
			xs.push(t - last);
			last = t;
			if (t < end) requestAnimationFrame(f);
			else {
				xs.sort((a, b) => a - b);
				done({ avg: xs.reduce((a, b) => a + b, 0) / xs.length, p95: xs[Math.floor(xs.length * 0.95)], frames: xs.length });
			}
		};
		requestAnimationFrame(f);
	})`;
	const measure = (ms: number) => page.evaluate(`(${MEASURE})(${ms})`) as Promise<{ avg: number; p95: number; frames: number }>;
	// Baseline: an empty page's frame interval in the same browser (the display's own pace).
	await page.goto(`http://127.0.0.1:${port}/`);
	await page.waitForTimeout(500);
	const idle = await measure(2000);
	console.log(`bench empty page, mean frame: ${idle.avg.toFixed(2)} ms (the frame pace of this headless browser)`);
	{
		await page.goto(`http://127.0.0.1:${port}/bench/dials?qubits=256&static=1`);
		await page.waitForFunction('window.benchReady && window.benchReady() === true', null, { timeout: 30_000 });
		await page.waitForTimeout(1000);
		const still = await measure(3000);
		console.log(`bench dial board 256 qubits standing still, mean frame: ${still.avg.toFixed(2)} ms (ratio ${(still.avg / idle.avg).toPrecision(3)} vs empty page)`);
	}
	{
		await page.goto(`http://127.0.0.1:${port}/bench/dials?qubits=256&board=workbench`);
		await page.waitForFunction('window.benchReady && window.benchReady() === true', null, { timeout: 30_000 });
		await page.waitForTimeout(1000);
		const wb = await measure(4000);
		console.log(`bench dial board 256 qubits playing at the workbench's board size (760×416), mean frame: ${wb.avg.toFixed(2)} ms (ratio ${(wb.avg / idle.avg).toPrecision(3)} vs empty page)`);
	}
	for (const n of [256, 1024]) {
		await page.goto(`http://127.0.0.1:${port}/bench/dials?qubits=${n}`);
		await page.waitForFunction('window.benchReady && window.benchReady() === true', null, { timeout: 30_000 });
		await page.waitForTimeout(1000);
		const playing = await measure(4000);
		console.log(`bench dial board ${n} qubits playing on a 1400×900 board, mean frame: ${playing.avg.toFixed(2)} ms (ratio ${(playing.avg / idle.avg).toPrecision(3)} vs empty page)`);
		console.log(`bench dial board ${n} qubits playing, p95 frame: ${playing.p95.toFixed(2)} ms`);
	}
	{
		// The workbench's first render of the 16-bit multiplier template (5,408 gates, 64 qubits):
		// lowering and running in the worker, then the board's first frame with every dial.
		// The page above still plays 1,024 dials: closed first, or it shares the 2 cores with the
		// measurement (it did until 2 Dec 2026, which made the first figure, 7.9 s, so slow).
		await page.close();
		const wbPage = await browser.newPage({ viewport: { width: 1440, height: 900 }, bypassCSP: true });
		// The first load is cold (nothing cached, the page's code compiled for the first time); the
		// median is of the warm loads after it. The machine is shared: the load average is printed.
		// First dials: step 0 drawn from the worker's first message (the summary line says the run is
		// still being computed); run loaded: the whole run's summary and frame drawn, measured too.
		const times: number[] = [];
		const loaded: number[] = [];
		let cold = 0;
		for (let i = 0; i < 6; i++) {
			await wbPage.goto(`http://127.0.0.1:${port}/bench/workbench?bits=16`);
			await wbPage.waitForFunction('window.firstDials && window.firstDials() !== null && window.runLoaded() !== null', null, { timeout: 60_000 });
			const t = (await wbPage.evaluate('window.firstDials()')) as number;
			if (i === 0) cold = t;
			else {
				times.push(t);
				loaded.push((await wbPage.evaluate('window.runLoaded()')) as number);
			}
		}
		times.sort((a, b) => a - b);
		loaded.sort((a, b) => a - b);
		const load = loadavg()[0].toFixed(1);
		console.log(`bench workbench first render, 16-bit multiplier (5,408 gates, 64 qubits), time to first dials: median ${times[2].toFixed(0)} ms of 5 warm loads (min ${times[0].toFixed(0)}, max ${times[4].toFixed(0)}; cold first load ${cold.toFixed(0)} ms; software WebGL; load average ${load} on 2 cores; aim 1,500 ms)`);
		console.log(`bench workbench first render, 16-bit multiplier, whole run loaded and drawn (summary line filled): median ${loaded[2].toFixed(0)} ms of the same 5 warm loads (min ${loaded[0].toFixed(0)}, max ${loaded[4].toFixed(0)})`);
		console.log('bench workbench first render, reference (2 Dec 2026, DEVELOPERS.md "Time to first dials"): the build before step 0 first, the specs reader and 4-texture batches against the build with them, 9 warm loads each interleaved in one run at load average 3.2 to 3.7: first dials 1,511 → 1,097 ms, whole run 1,511 → 1,527 ms');
		await wbPage.close();
	}
	await browser.close();
} finally {
	stop();
}
