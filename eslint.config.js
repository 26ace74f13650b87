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
		rules: {
			'no-restricted-imports': [
				'error',
				{
					patterns: [
						{ group: ['node:*', 'fs', 'path', 'worker_threads', 'os'], message: 'lib/quantum must not import Node modules' },
						{ group: ['svelte', 'svelte/*', '$app/*', '$lib/server/*', 'knex', 'mysql2'], message: 'lib/quantum must stay pure' }
					]
				}
			]
		}
	},
	{
		ignores: ['build/', '.svelte-kit/', 'node_modules/', '.data/', 'test-results/', 'playwright-report/', 'tests/artifacts/']
	}
);
