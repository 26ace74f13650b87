import { readFileSync } from 'node:fs';
import { isHttpError } from '@sveltejs/kit';
import { afterAll, describe, expect, it } from 'vitest';
import { closeAll } from '../shutdown';
import { heavyLimits, runHeavy } from './pool';
import { importUpload, readPostedDocument, traceSummary } from './index';

// Issue 10: heavy work runs in worker threads with a time and a memory limit. These run the real
// pool (piscina, the bundle esbuild makes from worker.ts) with small limits, so a runaway task is
// stopped in a test-sized time. The hostile inputs are the issue's, kept in tests/fixtures/hostile.

// The time limit is short only in the test of the time limit: the machine is shared, and the other
// tests must not be stopped by it when it is busy.
heavyLimits.timeMs = 60_000;
heavyLimits.memoryMb = 96;

const hostile = (name: string) => readFileSync(`tests/fixtures/hostile/${name}`, 'utf8');
const fileOf = (name: string, text: string) => new File([text], name);

async function refusal(p: Promise<unknown>): Promise<{ status: number; message: string }> {
	try {
		await p;
	} catch (e) {
		if (isHttpError(e)) return { status: e.status, message: e.body.message };
		throw e;
	}
	throw new Error('expected a refusal');
}

afterAll(() => closeAll(5000));

describe('heavy-work pool', () => {
	it('stops a task past its time limit with 422 naming what it did, while the web thread keeps running', async () => {
		let ticks = 0;
		const tick = setInterval(() => ticks++, 10);
		heavyLimits.timeMs = 1500;
		const r = await refusal(runHeavy('spin', { ms: 120_000 }, 'Reading spin.qasm')).finally(() => (heavyLimits.timeMs = 60_000));
		clearInterval(tick);
		expect(r.status).toBe(422);
		expect(r.message).toMatch(/^Reading spin\.qasm: stopped after 1\.5 s of computation/);
		// The spin never yields; had it run on this thread no timer could have fired meanwhile.
		expect(ticks).toBeGreaterThan(0);
	});

	it('stops a task past its memory limit with 413, and the next task still runs', async () => {
		const r = await refusal(runHeavy('hog', undefined as never, 'Reading hog.json'));
		expect(r.status).toBe(413);
		expect(r.message).toMatch(/^Reading hog\.json: needed more than 96 MiB of memory/);
		// A killed thread is replaced: a small file still reads.
		const ok = await importUpload(fileOf('bell.qasm', 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nh q[0];\ncx q[0],q[1];\n'));
		expect(ok.ok && ok.gateCount).toBe(2);
	});

	it('refuses the issue\'s hostile uploads with where and what', async () => {
		const pow = await importUpload(fileOf('pow-fraction.qasm', hostile('pow-fraction.qasm')));
		expect(pow).toMatchObject({ ok: false, status: 400 });
		// Line 3, column 7 of the file is the start of the expression (OpenQASM 3 file, counted by hand).
		if (!pow.ok) expect(pow.errors[0]).toMatch(/^pow-fraction\.qasm:3:7: number too large/);
		const reg = await importUpload(fileOf('huge-register.qasm', hostile('huge-register.qasm')));
		if (!reg.ok) expect(reg.errors[0]).toMatch(/^huge-register\.qasm:2:8: number too large/);
		else expect.fail('a register of (2**4096)**4096 qubits was accepted');
		// Six levels of blocks calling the next thirty times: 30^6 calls, no gate. Refused at upload
		// with the JSON path of the call that went past the limit.
		const nested = await importUpload(fileOf('nested-calls.json', hostile('nested-calls.json')));
		if (!nested.ok) expect(nested.errors[0]).toMatch(/^nested-calls\.json: body\[0\]→b6\.body\[\d+\]→.*block calls after expansion/);
		else expect.fail('the nested-calls document was accepted');
	});

	it('refuses the nested-calls document when saved or traced', async () => {
		const doc = JSON.parse(hostile('nested-calls.json'));
		const saved = await readPostedDocument({ text: hostile('nested-calls.json'), maxBytes: 4 * 2 ** 20 });
		expect(saved).toMatchObject({ ok: false, status: 400 });
		if (!saved.ok) expect(saved.message).toMatch(/^body\[0\]→b6.*block calls after expansion.*The workbench could not open it/);
		const traced = await refusal(traceSummary(doc, { values: {}, superposed: [] }));
		expect(traced.status).toBe(422);
		expect(traced.message).toMatch(/^The circuit does not lower here: body\[0\]→b6.*block calls after expansion/);
	});

	it('reads a broadcast file as a broadcast and counts its gates', async () => {
		// 300 lines of `h q;` over qreg q[1000]: 300 000 Hadamards after expansion.
		const r = await importUpload(fileOf('broadcast-300.qasm', hostile('broadcast-300.qasm')));
		expect(r.ok).toBe(true);
		if (r.ok) {
			expect(r.gateCount).toBe(300_000);
			expect(JSON.stringify(r.document).length).toBeLessThan(200_000);
		}
	});
});
