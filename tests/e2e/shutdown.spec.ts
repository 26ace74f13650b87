import { expect, test } from '@playwright/test';
import { spawn } from 'node:child_process';
import { createServer } from 'node:net';

// Issue 18: the built server stops cleanly and quickly. After SIGTERM or SIGINT adapter-node lets
// the running requests finish and emits `sveltekit:shutdown`; the app then closes its database
// pool and mail transport (src/lib/server/shutdown.ts), so the process exits at once instead of
// waiting about 30 s for their idle timers. Its log carries no colour codes when not on a terminal.

const freePort = () =>
	new Promise<number>((resolve) => {
		const s = createServer();
		s.listen(0, '127.0.0.1', () => {
			const port = (s.address() as { port: number }).port;
			s.close(() => resolve(port));
		});
	});

for (const signal of ['SIGTERM', 'SIGINT'] as const) {
	test(`${signal}: the server exits within 2 s once requests are done, log without escape codes`, async () => {
		test.setTimeout(90_000);
		const port = await freePort();
		const child = spawn(process.execPath, ['build'], { env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: `http://127.0.0.1:${port}` }, stdio: ['ignore', 'pipe', 'pipe'] });
		let log = '';
		child.stdout.on('data', (d) => (log += d));
		child.stderr.on('data', (d) => (log += d));
		const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
		// Up, with the database pool in use (the health check queries it).
		const until = Date.now() + 45_000;
		for (;;) {
			const ok = await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.ok).catch(() => false);
			if (ok) break;
			expect(Date.now() < until, `server did not come up:\n${log}`).toBe(true);
			await new Promise((r) => setTimeout(r, 200));
		}
		// A keep-alive connection stays open: adapter-node must still not wait for it.
		await fetch(`http://127.0.0.1:${port}/api/health`, { headers: { connection: 'keep-alive' } });
		const t0 = Date.now();
		child.kill(signal);
		const code = await Promise.race([exited, new Promise<'hung'>((r) => setTimeout(() => r('hung'), 10_000))]);
		const ms = Date.now() - t0;
		if (code === 'hung') child.kill('SIGKILL');
		expect(code).not.toBe('hung');
		expect(ms, `exit took ${ms} ms`).toBeLessThan(2000);
		expect(log.includes('\u001b[')).toBe(false);
	});
}
