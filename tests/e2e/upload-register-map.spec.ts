import { readFileSync } from 'node:fs';
import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// Our own 3-bit Fourier adder on one flat register q[6] (tests/fixtures/adder3-flat.qasm, written
// by flatFourierAdderQasm): x is q[0:2] least-significant bit first, y is q[3:5] written
// most-significant bit first, so the right map is x=q[0:2], y=q[5:-1:3].
const flat = readFileSync('tests/fixtures/adder3-flat.qasm');

/** Names under the dials: hover across the board until the tooltip names `count` different qubits. */
async function dialNames(page: Page, count: number): Promise<Set<string>> {
	const board = (await page.getByTestId('dial-board').boundingBox())!;
	const names = new Set<string>();
	const tip = page.getByTestId('dial-hover-name');
	for (let y = board.y + 20; y < board.y + board.height - 10 && names.size < count; y += 24)
		for (let x = board.x + 10; x < board.x + board.width - 10 && names.size < count; x += 24) {
			await page.mouse.move(x, y);
			if (await tip.isVisible()) names.add((await tip.textContent())!.trim());
		}
	return names;
}

test('a flat-register file is mapped in the upload form (one register reversed), proved, stepped, and the dials name the mapped registers', async ({ page }) => {
	test.setTimeout(150_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('File').setInputFiles({ name: `flat-adder-${Date.now()}.qasm`, mimeType: 'text/plain', buffer: flat });

	const step = page.getByTestId('register-map-step');
	await expect(step).toContainText('The file declares q[6]');
	const row = (q: string) => page.getByTestId('register-map-preview').locator(`tr[data-file-qubit="${q}"] td`);
	await expect(row('q[5]')).toHaveText(['q[5]', 'q', '5']);

	await step.getByRole('button', { name: 'Add a register' }).click();
	await page.getByLabel('Register 1', { exact: true }).fill('x=q[0:2]');
	// A register mapped in part is named in the step before anything is sent.
	await expect(step.getByRole('alert')).toHaveText('3 qubits of q (q[3:5]) are in no mapped register; name them too, for example work=q[3:5] for an ancilla or work register');
	await step.getByRole('button', { name: 'Add a register' }).click();
	await page.getByLabel('Register 2', { exact: true }).fill('y=q[3:6]');
	await expect(step.locator('#nc-reg-err-1')).toHaveText('"y=q[3:6]": index 6 is out of range for q[6]; expected 0..5');
	await expect(page.getByLabel('Register 2', { exact: true })).toHaveAttribute('aria-invalid', 'true');
	await page.getByLabel('Register 2', { exact: true }).fill('y=q[3:5]');
	await expect(row('q[3]')).toHaveText(['q[3]', 'y', '0']);
	// One click reverses y: the file wrote it most-significant bit first.
	await step.getByRole('button', { name: 'Reverse bit order' }).nth(1).click();
	await expect(page.getByLabel('Register 2', { exact: true })).toHaveValue('y=q[5:-1:3]');
	await expect(row('q[5]')).toHaveText(['q[5]', 'y', '0']);
	await expect(row('q[3]')).toHaveText(['q[3]', 'y', '2']);
	await expect(row('q[1]')).toHaveText(['q[1]', 'x', '1']);
	await expect(step.getByRole('alert')).toHaveCount(0);

	await page.getByRole('button', { name: 'Import' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await waitForRun(page);
	await page.getByLabel(/One per line/).fill('y = x + y mod 8');
	await page.getByLabel(/One per line/).press('Tab');
	await waitForRun(page);

	// Checked in the browser: proved for every input, and the exhaustive sweep beside it agrees.
	await page.getByRole('tab', { name: 'Check' }).click();
	await page.getByTestId('run-check').click();
	await expect(page.getByTestId('check-result')).toContainText('meets the spec', { timeout: 30_000 });
	await expect(page.getByTestId('check-result')).toContainText('64 inputs (all), 0 failing');
	await expect(page.getByTestId('proof-verdict')).toHaveAttribute('data-status', 'proved');

	// Step: the dials and the qubit table name x and y, not the file's q.
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toContainText('step 1 /');
	await page.waitForTimeout(500);
	const names = await dialNames(page, 6);
	expect([...names].sort()).toEqual(['x[0]', 'x[1]', 'x[2]', 'y[0]', 'y[1]', 'y[2]']);
	await page.getByTestId('show-table').click();
	await expect(page.locator('[data-testid=qubit-table] tr[data-qubit="y[2]"]')).toHaveCount(1);
	await expect(page.locator('[data-testid=qubit-table] tr[data-qubit^="q["]')).toHaveCount(0);
});

test('the server refuses a map that leaves qubits unnamed, under the register field, and creates nothing', async ({ page }) => {
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	const before = await page.locator('tbody tr').count();
	// Posted as a client that skips the form's own checks would: only x is named.
	const res = await page.request.post('/teams/halvorsen-lab/circuits?/upload', {
		multipart: { file: { name: 'flat.qasm', mimeType: 'text/plain', buffer: flat }, register: 'x=q[0:2]' },
		headers: { origin: new URL(page.url()).origin, 'x-sveltekit-action': 'true', accept: 'application/json' }
	});
	const body = await res.json();
	expect([body.type, body.status]).toEqual(['failure', 400]);
	expect(body.data).toContain('3 qubits of q (q[3:5]) are in no mapped register');
	await page.reload();
	await expect(page.locator('tbody tr')).toHaveCount(before);
});
