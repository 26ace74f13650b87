import { describe, expect, it } from 'vitest';
import { outboxAllowed } from './config';

// Issue 10: the outbox shows reset and invitation links, so it must be off in every `npm start`
// and production build; on only under `npm run dev` (vite's dev server) and the test runner.
describe('outboxAllowed', () => {
	it('is off for a plain npm start (scripts/env.sh no longer sets ORRERY_DEV_OUTBOX; start.sh sets NODE_ENV=production)', () => {
		expect(outboxAllowed({ NODE_ENV: 'production' }, false)).toBe(false);
		expect(outboxAllowed({}, false)).toBe(false);
	});
	it('stays off in a built app even when someone sets ORRERY_DEV_OUTBOX=1 (or the old PW_ name)', () => {
		expect(outboxAllowed({ ORRERY_DEV_OUTBOX: '1' }, false)).toBe(false);
		expect(outboxAllowed({ PW_DEV_OUTBOX: '1' }, false)).toBe(false);
	});
	it('NODE_ENV=production forces it off, also with the test settings and under the dev server', () => {
		expect(outboxAllowed({ NODE_ENV: 'production', ORRERY_DEV_OUTBOX: '1', ORRERY_TEST_RUN: '1' }, false)).toBe(false);
		expect(outboxAllowed({ NODE_ENV: 'production', ORRERY_DEV_OUTBOX: '1' }, true)).toBe(false);
	});
	it('is on under npm run dev (unless ORRERY_DEV_OUTBOX=0) and in the test runner', () => {
		expect(outboxAllowed({}, true)).toBe(true);
		expect(outboxAllowed({ ORRERY_DEV_OUTBOX: '0' }, true)).toBe(false);
		expect(outboxAllowed({ ORRERY_TEST_RUN: '1', ORRERY_DEV_OUTBOX: '1' }, false)).toBe(true);
		expect(outboxAllowed({ ORRERY_TEST_RUN: '1' }, false)).toBe(false);
	});
});

describe('the environment npm start really builds', () => {
	it('has the outbox off', async () => {
		const { execFileSync } = await import('node:child_process');
		// scripts/env.sh as start.sh sources it, then the NODE_ENV start.sh exports before `node build`.
		const out = execFileSync('bash', ['-c', 'ROOT="$PWD"; unset ORRERY_DEV_OUTBOX PW_DEV_OUTBOX ORRERY_TEST_RUN; source scripts/env.sh; export NODE_ENV=production; env -0'], {
			encoding: 'utf8'
		});
		const env = Object.fromEntries(
			out
				.split('\0')
				.filter(Boolean)
				.map((l) => [l.slice(0, l.indexOf('=')), l.slice(l.indexOf('=') + 1)])
		);
		expect(env.MAIL_DIR).toMatch(/mail$/);
		expect(outboxAllowed(env, false)).toBe(false);
		expect(env.ORRERY_DEV_OUTBOX).toBeUndefined();
		const start = (await import('node:fs')).readFileSync('scripts/start.sh', 'utf8');
		expect(start).toMatch(/export NODE_ENV=production[\s\S]*node build/);
	});
});
