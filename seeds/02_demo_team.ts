import type { Knex } from 'knex';
import { readFileSync } from 'node:fs';
import { hash, verify } from '@node-rs/argon2';
import { newId } from '../src/lib/server/ids';

// The invented "Halvorsen Phase Lab" with one member of each role (people from
// seeds/demo-accounts.json, all invented). Safe to run again: rows are matched by e-mail and slug,
// and a password hash is only replaced when it no longer matches the file.

type DemoAccount = { email: string; password: string; role: 'owner' | 'engineer' | 'reviewer' | 'viewer'; name: string };

const SLUG = 'halvorsen-lab';
const ARGON2 = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export async function seed(knex: Knex): Promise<void> {
	const accounts = JSON.parse(readFileSync(new URL('./demo-accounts.json', import.meta.url), 'utf8')) as DemoAccount[];
	const now = new Date();

	let team = await knex('teams').where({ slug: SLUG }).first('id');
	if (!team) {
		team = { id: newId() };
		await knex('teams').insert({ id: team.id, slug: SLUG, name: 'Halvorsen Phase Lab', created_at: now });
	}

	for (const a of accounts) {
		const email = a.email.toLowerCase();
		let user = await knex('users').where({ email }).first('id', 'password_hash');
		if (!user) {
			user = { id: newId() };
			await knex('users').insert({ id: user.id, email, name: a.name, password_hash: await hash(a.password, ARGON2), created_at: now, updated_at: now });
		} else if (!(await verify(user.password_hash, a.password).catch(() => false))) {
			await knex('users').where({ id: user.id }).update({ name: a.name, password_hash: await hash(a.password, ARGON2), updated_at: now });
		}
		await knex('memberships')
			.insert({ team_id: team.id, user_id: user.id, role: a.role, created_at: now, updated_at: now })
			.onConflict(['team_id', 'user_id'])
			.merge({ role: a.role, updated_at: now });
		if (a.role === 'owner') await knex('teams').where({ id: team.id }).whereNull('created_by').update({ created_by: user.id });
	}
}
