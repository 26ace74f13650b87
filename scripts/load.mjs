// npm run load: a bounded load test against a running Orrery on this machine (loopback only).
// 50 signed-in users (load-N@load.example, signed up on first use) request pages and API routes
// in a loop for DURATION seconds (default 20, at most 60) or until MAX requests (default 20 000),
// then requests/s and latency percentiles are printed. Start the app first (npm start).
//   ORIGIN=http://127.0.0.1:3000 USERS=50 DURATION=20 npm run load
const origin = process.env.ORIGIN ?? 'http://127.0.0.1:3000';
const host = new URL(origin).hostname;
if (!['127.0.0.1', 'localhost', '::1', '[::1]'].includes(host)) {
	console.error(`load: ${origin} is not on this machine; the load test only runs against loopback addresses.`);
	process.exit(2);
}
const USERS = Math.min(Number(process.env.USERS ?? 50), 200);
const DURATION = Math.min(Number(process.env.DURATION ?? 20), 60);
const MAX = Math.min(Number(process.env.MAX ?? 20_000), 100_000);
const PASSWORD = 'load-test-phase-41';
const PATHS = ['/teams', '/api/me', '/api/health', '/teams/__data.json'];

async function session(i) {
	const email = `load-${i}@load.example`;
	const form = (o) => new URLSearchParams(o).toString();
	const headers = { origin, 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' };
	// Sign up first, sign in when the account is there already: a sign-in that fails (no account yet)
	// counts against this address, and 50 of them would lock the next run out for a quarter hour.
	let res = await fetch(`${origin}/signup`, { method: 'POST', body: form({ name: `Load user ${i}`, email, password: PASSWORD }), headers, redirect: 'manual' });
	if (res.status !== 303) res = await fetch(`${origin}/signin`, { method: 'POST', body: form({ email, password: PASSWORD }), headers, redirect: 'manual' });
	const cookie = (res.headers.getSetCookie?.() ?? []).map((c) => c.split(';')[0]).find((c) => c.startsWith('orrery_session='));
	if (res.status !== 303 || !cookie) throw new Error(`could not sign in ${email} (status ${res.status})`);
	return cookie;
}

const cookies = [];
for (let i = 0; i < USERS; i++) cookies.push(await session(i));
console.log(`load: ${USERS} users signed in; ${DURATION} s or ${MAX} requests against ${origin}`);

const latencies = [];
const errors = new Map();
let sent = 0;
const until = Date.now() + DURATION * 1000;
const t0 = performance.now();
await Promise.all(
	cookies.map(async (cookie, u) => {
		for (let k = u; Date.now() < until && sent < MAX; k++) {
			sent++;
			const path = PATHS[k % PATHS.length];
			const start = performance.now();
			try {
				const res = await fetch(origin + path, { headers: { cookie }, redirect: 'manual' });
				await res.arrayBuffer();
				if (res.status >= 400) errors.set(`${res.status} ${path}`, (errors.get(`${res.status} ${path}`) ?? 0) + 1);
			} catch (e) {
				errors.set(String(e.cause?.code ?? e.message), (errors.get(String(e.cause?.code ?? e.message)) ?? 0) + 1);
			}
			latencies.push(performance.now() - start);
		}
	})
);
const seconds = (performance.now() - t0) / 1000;
latencies.sort((a, b) => a - b);
const pct = (p) => latencies[Math.min(latencies.length - 1, Math.floor((p / 100) * latencies.length))].toFixed(1);
console.log(`load: ${latencies.length} requests in ${seconds.toFixed(1)} s = ${(latencies.length / seconds).toFixed(0)} requests/s`);
console.log(`load: latency ms p50 ${pct(50)}  p90 ${pct(90)}  p95 ${pct(95)}  p99 ${pct(99)}  max ${latencies.at(-1).toFixed(1)}`);
console.log(`load: errors ${errors.size ? [...errors].map(([k, n]) => `${k} ×${n}`).join(', ') : 'none'}`);
process.exit(errors.size ? 1 : 0);
