// Start-up of the command line (the esbuild bundle that bin/orrery.js runs) against `node -e 0`,
// measured in the same run: median wall time of N runs of `orrery count` on a 3-bit adder.
// Part of `npm run bench`. Target: well under a second, i.e. a small multiple of Node's own start.
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bin = join(root, 'bin', 'orrery.js');
const file = join(root, 'src', 'lib', 'quantum', 'qasm', 'fixtures', 'adder3.qasm');
const N = Number(process.argv[2] ?? 9);

function median(args) {
	const t = [];
	for (let i = 0; i < N; i++) {
		const s = performance.now();
		const r = spawnSync(process.execPath, args, { stdio: 'ignore' });
		t.push(performance.now() - s);
		if (r.status !== 0) throw new Error(`${args.join(' ')} exited ${r.status}`);
	}
	return t.sort((a, b) => a - b)[N >> 1];
}

spawnSync(process.execPath, [bin, 'count', file], { stdio: 'ignore' }); // build the bundle if missing or stale
const base = median(['-e', '0']);
const cli = median([bin, 'count', file]);
console.log(`bench cli start-up (orrery count, 3-bit adder): ${cli.toFixed(0)} ms (ratio ${(cli / base).toPrecision(3)} vs node -e 0 = ${base.toFixed(0)} ms)`);
