// Writes the worked-example OpenQASM files of issue 13 into src/lib/quantum/qasm/fixtures/
// (committed; re-run with `npx tsx scripts/make-qasm-fixtures.ts` after changing this script).
// The adders are the Fourier adder of Draper 2000 (quant-ph/0008033): QFT on b without the final
// swaps, then a[k] turns b[j] by π/2^(j−k) for k ≤ j, then the inverse QFT. Each controlled phase
// is written out the way exporters write it, as single-qubit phases and two CNOTs.
import { writeFileSync } from 'node:fs';

const dir = new URL('../src/lib/quantum/qasm/fixtures/', import.meta.url);

type Emit = (theta: number, c: string, t: string, lines: string[]) => void;

/** u1(θ/2) c; u1(θ/2) t; cx c,t; u1(−θ/2) t; cx c,t — angles printed with `digits` decimals. */
const u1Form =
	(fmt: (x: number) => string): Emit =>
	(th, c, t, out) => {
		out.push(`u1(${fmt(th / 2)}) ${c};`, `u1(${fmt(th / 2)}) ${t};`, `cx ${c},${t};`, `u1(${fmt(-th / 2)}) ${t};`, `cx ${c},${t};`);
	};
/** rz(θ/2) c; cx c,t; rz(−θ/2) t; cx c,t; rz(θ/2) t — the same up to the global phase e^{−iθ/4}. */
const rzForm =
	(fmt: (x: number) => string): Emit =>
	(th, c, t, out) => {
		out.push(`rz(${fmt(th / 2)}) ${c};`, `cx ${c},${t};`, `rz(${fmt(-th / 2)}) ${t};`, `cx ${c},${t};`, `rz(${fmt(th / 2)}) ${t};`);
	};

function adder(n: number, a: (i: number) => string, b: (i: number) => string, cp: Emit, out: string[], tweak?: (j: number, k: number, th: number) => Emit | null): void {
	out.push(`// QFT on b (no final swaps)`);
	for (let j = n - 1; j >= 0; j--) {
		out.push(`h ${b(j)};`);
		for (let k = j - 1; k >= 0; k--) cp(Math.PI / 2 ** (j - k), b(k), b(j), out);
	}
	out.push(`// b += a`);
	for (let j = 0; j < n; j++)
		for (let k = 0; k <= j; k++) {
			const th = Math.PI / 2 ** (j - k);
			(tweak?.(j, k, th) ?? cp)(th, a(k), b(j), out);
		}
	out.push(`// inverse QFT on b`);
	for (let j = 0; j < n; j++) {
		for (let k = 0; k < j; k++) cp(-Math.PI / 2 ** (j - k), b(k), b(j), out);
		out.push(`h ${b(j)};`);
	}
}

const six = (x: number) => x.toFixed(6);
const full = (x: number) => String(x);

// 1. 5-bit adder in one flat register, most-significant bit first: q[0] is a's MSB, q[5] is b's MSB.
{
	const head = [
		'// Orrery worked example (issue 13): 5-bit Fourier adder b <- a + b mod 32 in ONE register,',
		'// written most-significant bit first (q[0] = a[4], q[4] = a[0], q[5] = b[4], q[9] = b[0]),',
		'// every controlled phase decomposed into u1 + two CNOTs, angles printed with 6 decimals.',
		'// Map it with: --register a=q[4:-1:0] --register b=q[9:-1:5]',
		'OPENQASM 2.0;',
		'include "qelib1.inc";',
		'qreg q[10];'
	];
	const a = (i: number) => `q[${4 - i}]`;
	const b = (i: number) => `q[${9 - i}]`;
	const right: string[] = [...head];
	adder(5, a, b, u1Form(six), right);
	writeFileSync(new URL('adder5-flat-msb.qasm', dir), right.join('\n') + '\n');
	// The same with one rotation halved: the u1 on the target of a[1] → b[3] (θ/2 written as θ/4).
	const bad: string[] = [...head.slice(0, 1), '// WRONG ON PURPOSE: the target rotation of the controlled phase a[1] -> b[3] is halved.', ...head.slice(1)];
	const halved: Emit = (th, c, t, out) => {
		out.push(`u1(${six(th / 2)}) ${c};`, `u1(${six(th / 4)}) ${t};`, `cx ${c},${t};`, `u1(${six(-th / 2)}) ${t};`, `cx ${c},${t};`);
	};
	adder(5, a, b, u1Form(six), bad, (j, k) => (j === 3 && k === 1 ? halved : null));
	writeFileSync(new URL('adder5-flat-msb-halved.qasm', dir), bad.join('\n') + '\n');
}

// 2. 10-bit adder, rz-decomposed controlled phases, full-precision floats, one flat register LSB first.
{
	const out = [
		'// Orrery worked example (issue 13): 10-bit Fourier adder b <- a + b mod 1024 in one register',
		'// (q[0..9] = a, q[10..19] = b, least-significant bit first), controlled phases written with rz',
		'// and two CNOTs (equal to cp up to a global phase), angles as full-precision floats.',
		'// Map it with: --register a=q[0:9] --register b=q[10:19]',
		'OPENQASM 2.0;',
		'include "qelib1.inc";',
		'qreg q[20];'
	];
	adder(10, (i) => `q[${i}]`, (i) => `q[${10 + i}]`, rzForm(full), out);
	writeFileSync(new URL('adder10-flat-rz.qasm', dir), out.join('\n') + '\n');
}
