import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect, it } from 'vitest';

// Issue 10: the app died out of memory and nothing restarted it. npm start now runs it under
// scripts/supervise.sh: a process that dies is started again; SIGTERM stops the supervisor for good.
it('scripts/supervise.sh starts a dead process again and stops on SIGTERM', async () => {
	const dir = mkdtempSync(join(tmpdir(), 'orrery-supervise-'));
	const runs = join(dir, 'runs');
	const sup = spawn('bash', ['scripts/supervise.sh', 'bash', '-c', `echo run >> ${runs}; exit 7`], { stdio: 'ignore' });
	const count = () => (existsSync(runs) ? readFileSync(runs, 'utf8').split('\n').filter(Boolean).length : 0);
	for (let i = 0; i < 100 && count() < 2; i++) await new Promise((r) => setTimeout(r, 100));
	expect(count(), 'the process was started again after it died').toBeGreaterThanOrEqual(2);
	const exited = new Promise<number | null>((r) => sup.on('exit', (code) => r(code)));
	sup.kill('SIGTERM');
	expect(await exited).toBe(0);
});
