// The JSON bodies the api/ endpoints answer with. Each endpoint builds its body `satisfies` the type
// here, and the browser's client (client.ts) reads the same type, so the two cannot drift apart.
import type { CheckView } from '$lib/server/checks/view';

/** GET /api/teams/[slug]/circuits/[id]/checks: newest first, the latest with its progress. */
export interface CircuitChecksResponse {
	latest: CheckView | null;
	checks: CheckView[];
}

/** POST /api/teams/[slug]/circuits/[id]/checks (202): the queued check; `reported` when an old client sent a verdict. */
export interface CheckQueuedResponse {
	check: CheckView;
	reported?: { by: 'command line'; ok: boolean | undefined; verdictSet: false };
	message?: string;
}

/** POST /api/teams/[slug]/checks/[id]/cancel: the check after the cancel request. */
export interface CheckCancelledResponse {
	check: CheckView;
}
