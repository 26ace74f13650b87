import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	compilerOptions: { runes: true },
	kit: {
		// SvelteKit's origin check on form posts stays on (its default); do not add trusted origins lightly.
		adapter: adapter({ out: 'build' })
	}
};

export default config;
