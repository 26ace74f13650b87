import type { Adapter, DatabaseSession, DatabaseUser } from 'lucia';
import type { Db } from './db';

// lucia 3's storage contract over our Knex pool: sessions(id, user_id, expires_at) and users.
// Written here rather than @lucia-auth/adapter-mysql so that it shares the app's pool and types.

type SessionRow = { id: string; user_id: string; expires_at: Date };

function toSession(r: SessionRow): DatabaseSession {
	return { id: r.id, userId: r.user_id, expiresAt: new Date(r.expires_at), attributes: {} };
}

export class KnexLuciaAdapter implements Adapter {
	constructor(private db: Db) {}

	async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
		const row = await this.db('sessions as s')
			.join('users as u', 'u.id', 's.user_id')
			.where('s.id', sessionId)
			.first('s.id', 's.user_id', 's.expires_at', 'u.email', 'u.name');
		if (!row) return [null, null];
		return [toSession(row), { id: row.user_id, attributes: { email: row.email, name: row.name } }];
	}

	async getUserSessions(userId: string): Promise<DatabaseSession[]> {
		const rows = await this.db<SessionRow>('sessions').where({ user_id: userId });
		return rows.map(toSession);
	}

	async setSession(session: DatabaseSession): Promise<void> {
		await this.db('sessions').insert({ id: session.id, user_id: session.userId, expires_at: session.expiresAt, created_at: new Date() });
	}

	async updateSessionExpiration(sessionId: string, expiresAt: Date): Promise<void> {
		await this.db('sessions').where({ id: sessionId }).update({ expires_at: expiresAt });
	}

	async deleteSession(sessionId: string): Promise<void> {
		await this.db('sessions').where({ id: sessionId }).delete();
	}

	async deleteUserSessions(userId: string): Promise<void> {
		await this.db('sessions').where({ user_id: userId }).delete();
	}

	async deleteExpiredSessions(): Promise<void> {
		await this.db('sessions').where('expires_at', '<=', new Date()).delete();
	}
}
