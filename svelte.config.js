import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	compilerOptions: { runes: true },
	kit: {
		// SvelteKit's origin check on form posts stays on (its default); do not add trusted origins lightly.
		adapter: adapter({ out: 'build' }),
		// The content security policy of every page (issue 10). SvelteKit adds a nonce (server-rendered
		// pages) or a hash (prerendered) to script-src for its own start-up script, so no inline
		// script runs without one and nothing runs from another origin. Answers that are not pages
		// get a deny-all policy in hooks.server.ts.
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				// 'unsafe-inline' for styles only: Svelte writes style="…" attributes (dial colours,
				// widths, transforms bound to state), and html-to-image inlines computed styles into the
				// snapshot it draws. Attribute styles cannot carry a nonce or a hash; styles cannot run code.
				'style-src': ['self', 'unsafe-inline'],
				// data: and blob: for the snapshot (html-to-image draws through data: URLs and an image
				// of the page; the snapshot preview is a blob: URL) and pixi's textures.
				'img-src': ['self', 'data:', 'blob:'],
				'font-src': ['self', 'data:'],
				// The engine worker is a file of this origin; pixi decodes images in a blob: worker.
				'worker-src': ['self', 'blob:'],
				// html-to-image fetches the page's own fonts and images (and reads data: URLs the same way).
				'connect-src': ['self', 'data:', 'blob:'],
				'object-src': ['none'],
				'base-uri': ['self'],
				'form-action': ['self'],
				'frame-ancestors': ['none']
			}
		}
	}
};

export default config;
