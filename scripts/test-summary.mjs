// Sums every runner's results into one closing line: "N passed, N failed[, N skipped]".
// Usage: node scripts/test-summary.mjs <vitest.json> <playwright.json> <steps.txt>
import { existsSync, readFileSync } from 'node:fs';

const [vitestFile, pwFile, stepsFile] = process.argv.slice(2);
let passed = 0, failed = 0, skipped = 0;
const lines = [];

if (vitestFile && existsSync(vitestFile)) {
	const v = JSON.parse(readFileSync(vitestFile, 'utf8'));
	passed += v.numPassedTests ?? 0;
	failed += (v.numFailedTests ?? 0) + (v.numRuntimeErrorTestSuites ?? 0) + (v.numFailedTestSuites && !v.numFailedTests ? v.numFailedTestSuites : 0);
	skipped += (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0);
	lines.push(`vitest: ${v.numPassedTests} passed, ${v.numFailedTests} failed`);
} else if (vitestFile) {
	failed += 1;
	lines.push('vitest: no report (it did not run to the end)');
}

if (pwFile && existsSync(pwFile)) {
	const p = JSON.parse(readFileSync(pwFile, 'utf8'));
	const s = p.stats ?? {};
	passed += (s.expected ?? 0) + (s.flaky ?? 0);
	failed += s.unexpected ?? 0;
	skipped += s.skipped ?? 0;
	if ((p.errors ?? []).length && !(s.expected || s.unexpected)) failed += 1;
	lines.push(`playwright: ${s.expected ?? 0} passed, ${s.unexpected ?? 0} failed, ${s.flaky ?? 0} flaky`);
} else if (pwFile) {
	failed += 1;
	lines.push('playwright: no report (it did not run to the end)');
}

if (stepsFile && existsSync(stepsFile)) {
	for (const line of readFileSync(stepsFile, 'utf8').split('\n').filter(Boolean)) {
		const [name, status] = line.split(' ');
		if (status === 'ok') passed += 1;
		else failed += 1;
		lines.push(`${name}: ${status}`);
	}
}

for (const l of lines) console.log(`  ${l}`);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exitCode = failed > 0 ? 1 : 0;
