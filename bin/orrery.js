#!/usr/bin/env node
// Package entry: run the bundled command line (plain JavaScript, built with esbuild). The bundle
// is built on first use and rebuilt when one of its sources is newer, so a fresh clone works.
import { readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bundle = join(root, 'node_modules', '.cache', 'orrery-cli', 'orrery.mjs');

function stale() {
	try {
		const built = statSync(bundle).mtimeMs;
		const inputs = JSON.parse(readFileSync(`${bundle}.inputs.json`, 'utf8'));
		for (const f of inputs) if (statSync(join(root, f)).mtimeMs > built) return true;
		return false;
	} catch {
		return true;
	}
}

if (stale()) {
	const { buildCli } = await import('../scripts/build-cli.mjs');
	await buildCli();
}
await import(pathToFileURL(bundle).href);
