import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { join } from 'node:path';
import type { Plugin, ResolvedConfig } from 'vite';
import { defineConfig } from 'vitest/config';

/**
 * The worker-thread pool's code (src/lib/server/heavy/worker.ts) is its own bundle: a pool thread
 * loads a file by path, and the adapter's server bundle has no entry for it. After the server
 * build, once adapter-node has written build/ (its closeBundle runs first: plugins run in order),
 * esbuild writes build/heavy-worker.js, which the built server finds beside its chunks.
 */
function heavyWorkerBundle(): Plugin {
	let config: ResolvedConfig;
	return {
		name: 'orrery:heavy-worker',
		apply: 'build',
		configResolved(c) {
			config = c;
		},
		closeBundle: {
			sequential: true,
			order: 'post',
			async handler() {
				if (!config.build.ssr) return;
				const { buildHeavyWorker } = await import('./scripts/build-heavy-worker.mjs');
				await buildHeavyWorker(join(config.root, 'build', 'heavy-worker.js'));
			}
		}
	};
}

export default defineConfig({
	plugins: [tailwindcss(), sveltekit(), heavyWorkerBundle()],
	server: { host: '127.0.0.1', port: 5173, strictPort: false },
	worker: { format: 'es' },
	test: {
		include: ['src/**/*.test.ts', 'tests/integration/**/*.test.ts'],
		environment: 'node',
		testTimeout: 30_000,
		hookTimeout: 60_000,
		// Integration tests share one throwaway database; run files one at a time.
		fileParallelism: false,
		pool: 'forks'
	}
});
