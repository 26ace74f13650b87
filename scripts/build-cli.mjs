// Bundle the command line (src/cli/entry.ts and everything it imports) into one plain
// JavaScript file with esbuild, so `orrery` starts without compiling TypeScript.
// bin/orrery.js calls this when the bundle is missing or older than one of its sources; the
// output lives in node_modules/.cache (never committed). Also runnable: node scripts/build-cli.mjs
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
/** Where the bundle is written, and beside it the list of its source files (for the staleness check). */
export const CLI_BUNDLE = join(root, 'node_modules', '.cache', 'orrery-cli', 'orrery.mjs');

export async function buildCli() {
	const esbuild = await import('esbuild');
	mkdirSync(dirname(CLI_BUNDLE), { recursive: true });
	const tmp = `${CLI_BUNDLE}.${process.pid}.tmp`;
	const r = await esbuild.build({
		entryPoints: [join(root, 'src', 'cli', 'entry.ts')],
		bundle: true,
		platform: 'node',
		format: 'esm',
		target: 'node20',
		outfile: tmp,
		metafile: true,
		logLevel: 'error',
		legalComments: 'none',
		minify: true,
		// Bundled CommonJS dependencies may require() Node built-ins.
		banner: { js: "import { createRequire as __orreryRequire } from 'node:module'; const require = __orreryRequire(import.meta.url);" }
	});
	// Sources to watch: our own files (dependencies change only with the lock file).
	const inputs = Object.keys(r.metafile.inputs)
		.map((p) => relative(root, join(root, p)))
		.filter((p) => !p.split(/[\\/]/).includes('node_modules'));
	inputs.push('package-lock.json', 'scripts/build-cli.mjs');
	writeFileSync(`${CLI_BUNDLE}.inputs.json`, JSON.stringify(inputs));
	renameSync(tmp, CLI_BUNDLE);
	return CLI_BUNDLE;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
	const out = await buildCli();
	process.stdout.write(`wrote ${relative(root, out)}\n`);
}
