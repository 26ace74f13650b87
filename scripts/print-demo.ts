// Printed by npm start: where to sign in with the demo accounts (if the seeds made them).
import { readFileSync, existsSync } from 'node:fs';
const f = 'seeds/demo-accounts.json';
if (existsSync(f)) {
	const accounts = JSON.parse(readFileSync(f, 'utf8')) as { email: string; password: string; role: string }[];
	console.log('demo sign-ins (invented lab "Halvorsen Phase Lab"):');
	for (const a of accounts) console.log(`  ${a.role.padEnd(9)} ${a.email}  password: ${a.password}`);
}
