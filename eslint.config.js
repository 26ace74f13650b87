import js from '@eslint/js';
import ts from 'typescript-eslint';
import svelte from 'eslint-plugin-svelte';
import globals from 'globals';
import svelteConfig from './svelte.config.js';

export default ts.config(
	js.configs.recommended,
	...ts.configs.recommended,
	...svelte.configs.recommended,
	{
		languageOptions: { globals: { ...globals.browser, ...globals.node } }
	},
	{
		files: ['**/*.svelte', '**/*.svelte.ts', '**/*.svelte.js'],
		languageOptions: {
			parserOptions: { projectService: true, extraFileExtensions: ['.svelte'], parser: ts.parser, svelteConfig }
		}
	},
	{
		rules: {
			'@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
			'svelte/no-navigation-without-resolve': 'off'
		}
	},
	{
		// The computation core runs in a Web Worker, on the server and in the CLI: keep it free of
		// the DOM, Node, Svelte and the database.
		files: ['src/lib/quantum/**/*.ts'],
		ignores: ['src/lib/quantum/**/*.test.ts', 'src/lib/quantum/bench/**'],
		languageOptions: { globals: { ...globals.es2021, console: 'readonly' } },
		rules: {
			'no-restricted-imports': [
				'error',
				{
					patterns: [
						{ group: ['node:*', 'fs', 'path', 'worker_threads', 'os'], message: 'lib/quantum must not import Node modules' },
						{ group: ['svelte', 'svelte/*', '$app/*', '$lib/server/*', 'knex', 'mysql2'], message: 'lib/quantum must stay pure' },
						{ group: ['$lib/components/*', '**/components/*'], message: 'lib/quantum must not import components' }
					]
				}
			]
		}
	},
	{
		// Dependencies point one way: components use the core, the worker, state and the server, never
		// the reverse. Shared code lives in lib/quantum, lib/dials, lib/worker, lib/state or lib/review.
		files: ['src/lib/worker/**/*.ts', 'src/lib/server/**/*.ts', 'src/lib/dials/**/*.ts', 'src/lib/state/**/*.ts', 'src/lib/review/**/*.ts', 'src/cli/**/*.ts', 'seeds/**/*.ts', 'src/routes/**/*.server.ts', 'src/routes/api/**/*.ts'],
		rules: {
			'no-restricted-imports': ['error', { patterns: [{ group: ['$lib/components/*', '**/components/*'], message: 'import shared code from lib/quantum, lib/dials or lib/worker, not from components' }] }]
		}
	},
	{
		ignores: ['build/', '.svelte-kit/', 'node_modules/', '.data/', 'test-results/', 'playwright-report/', 'tests/artifacts/']
	}
);
