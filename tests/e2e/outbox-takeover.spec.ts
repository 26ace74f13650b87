import { expect, test } from '@playwright/test';
import { formHeaders, freshEmail, newContext, signIn, signUp, waitForMail } from './support/accounts';
import { demo } from './support/demo';

// Issue 10: the development outbox handed reset links to anyone (reset for the owner's address,
// read the link from the outbox, set a password: three requests to own the team). The test runner
// starts the built app with the outbox on (ORRERY_TEST_RUN=1, ORRERY_DEV_OUTBOX=1), the most open
// it can be; src/lib/server/config.test.ts proves a plain `npm start` and NODE_ENV=production have
// it off altogether.

test('a reset link for the owner cannot be read without the mailbox', async () => {
	const attacker = await newContext();
	const asked = await attacker.post('/reset', { form: { email: demo.owner.email }, headers: formHeaders });
	expect(asked.status()).toBe(200);
	// The mailbox (the mail fake's files, which only the machine's user can read) has the link.
	const mail = await waitForMail(demo.owner.email, '/reset/');
	const token = new URL(mail.link).pathname.split('/').pop()!;
	expect(token.length).toBeGreaterThan(16);

	// Every way an anonymous visitor might read it: the page, its data, the API.
	const paths = ['/dev/outbox', '/dev/outbox/__data.json', '/dev/outbox/__data.json?x-sveltekit-invalidated=1', '/api/me', '/reset', '/reset/__data.json', '/'];
	for (const p of paths) {
		const res = await attacker.get(p);
		expect(await res.text(), `anonymous ${p} must not carry the token`).not.toContain(token);
	}
	expect((await attacker.get('/dev/outbox')).status()).toBe(404);
	// SvelteKit answers a data request with 200 and the load's error inside: it must be the 404.
	const data = await attacker.get('/dev/outbox/__data.json');
	expect(await data.text()).toMatch(/"type":"error".*"status":404/);

	// A signed-in stranger (any address can sign up) sees the outbox, but only their own mail.
	const strangerEmail = freshEmail('stranger');
	await signUp(attacker, strangerEmail, 'Odd Stranger');
	for (const p of [...paths, '/teams', '/teams/__data.json']) {
		const res = await attacker.get(p);
		expect(await res.text(), `signed-in stranger ${p} must not carry the token`).not.toContain(token);
	}
	const page = await attacker.get('/dev/outbox', { headers: { accept: 'text/html' } });
	expect(page.status()).toBe(200);
	expect(await page.text()).not.toContain(demo.owner.email);
	await attacker.dispose();

	// The owner, signed in, does see their own reset mail there (the page works for its purpose).
	const owner = await newContext();
	expect((await signIn(owner, demo.owner.email, demo.owner.password)).status()).toBe(303);
	const own = await owner.get('/dev/outbox/__data.json');
	expect(own.status()).toBe(200);
	expect(await own.text()).toContain(token);
	await owner.dispose();
});
