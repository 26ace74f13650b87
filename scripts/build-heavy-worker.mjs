// Bundle the worker-thread pool's entry (src/lib/server/heavy/worker.ts and what it imports) into
// one plain JavaScript file with esbuild. A pool thread is a bare Node worker: it cannot load
// TypeScript or resolve $lib, and Vite's server bundle has no entry for it, so it gets its own.
//   - `vite build` calls this after the adapter has written build/ (plugin in vite.config.ts):
//     build/heavy-worker.js, found by the built server beside its own chunks (pool.ts);
//   - the dev server and vitest call it on first use, into node_modules/.cache/orrery-heavy/.
// Also runnable: node scripts/build-heavy-worker.mjs [outfile]
import { mkdirSync, renameSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
export const DEV_HEAVY_WORKER = join(root, 'node_modules', '.cache', 'orrery-heavy', 'heavy-worker.mjs');

/** Write the bundle to `outfile` (atomically: a pool starting meanwhile never reads half a file). */
export async function buildHeavyWorker(outfile = DEV_HEAVY_WORKER) {
	const esbuild = await import('esbuild');
	mkdirSync(dirname(outfile), { recursive: true });
	const tmp = `${outfile}.${process.pid}.tmp`;
	await esbuild.build({
		entryPoints: [join(root, 'src', 'lib', 'server', 'heavy', 'worker.ts')],
		bundle: true,
		platform: 'node',
		format: 'esm',
		target: 'node20',
		outfile: tmp,
		logLevel: 'error',
		legalComments: 'none',
		alias: { $lib: join(root, 'src', 'lib') },
		// Bundled CommonJS dependencies may require() Node built-ins.
		banner: { js: "import { createRequire as __orreryRequire } from 'node:module'; const require = __orreryRequire(import.meta.url);" }
	});
	renameSync(tmp, outfile);
	return outfile;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
	process.stdout.write(`wrote ${await buildHeavyWorker(process.argv[2] ? resolve(process.argv[2]) : undefined)}\n`);
}
