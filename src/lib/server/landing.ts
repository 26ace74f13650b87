import { db } from './db';
import { listMyTeams } from './repositories/teams';
import { routes, safeNext } from '$lib/routes';

/** Where to go after signing in: the `next` page, else the team if there is exactly one, else /teams. */
export async function landingFor(userId: string, next?: string | null): Promise<string> {
	const target = safeNext(next);
	if (target) return target;
	const teams = await listMyTeams(db, userId);
	return teams.length === 1 ? routes.team(teams[0].slug) : routes.teams();
}
