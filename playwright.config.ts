import { defineConfig } from '@playwright/test';

const port = Number(process.env.E2E_PORT ?? 4173);
export const baseURL = `http://127.0.0.1:${port}`;

export default defineConfig({
	testDir: 'tests/e2e',
	timeout: 60_000,
	expect: { timeout: 10_000 },
	fullyParallel: false,
	workers: 1,
	retries: 0,
	outputDir: 'test-results',
	reporter: process.env.ORRERY_JSON_REPORT
		? [['list'], ['json', { outputFile: process.env.ORRERY_JSON_REPORT }]]
		: [['list']],
	use: {
		baseURL,
		trace: 'retain-on-failure',
		screenshot: 'only-on-failure',
		launchOptions: {
			executablePath: '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run',
				'--disable-quic',
				'--use-angle=swiftshader',
				'--enable-unsafe-swiftshader'
			]
		}
	},
	webServer: {
		command: 'node build',
		url: `${baseURL}/api/health`,
		reuseExistingServer: false,
		timeout: 60_000,
		env: { ...(process.env as Record<string, string>), PORT: String(port), HOST: '127.0.0.1', ORIGIN: baseURL }
	}
});
