// The JSON bodies the api/ endpoints answer with. Each endpoint builds its body `satisfies` the type
// here, and the browser's client (client.ts) reads the same type, so the two cannot drift apart.
import type { SavedBreakpointView } from '$lib/review/types';
import type { CheckView } from '$lib/server/checks/view';
import type { SavedTrace } from '$lib/server/review';

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

/** GET /api/teams/[slug]/breakpoints?circuit=…&version=…: the version's saved breakpoints. */
export interface BreakpointListResponse {
	breakpoints: SavedBreakpointView[];
}

/** POST /api/teams/[slug]/breakpoints (201): the saved breakpoint. */
export interface BreakpointCreatedResponse {
	breakpoint: SavedBreakpointView;
}

/** PATCH /api/teams/[slug]/breakpoints/[id]: the note's new revision. */
export interface BreakpointAnnotatedResponse {
	id: string;
	revision: number;
}

/** POST /api/teams/[slug]/breakpoints/[id]/comments (201): the comment's id. */
export interface CommentCreatedResponse {
	id: string;
}

/** POST /api/teams/[slug]/traces (201): the saved trace, where the server computed it, and its links. */
export interface TraceCreatedResponse {
	id: string;
	computedBy: SavedTrace['computedBy'];
	circuit: { id: string; version: number; addedVersion: boolean };
	firstDivergence: SavedTrace['firstDivergence'];
	lastStep: number;
	links: { replay: string; api: string; circuit: string };
}

/** POST /api/teams/[slug]/reports (201): the report, how many mails went out, and its links. */
export interface ReportCreatedResponse {
	id: string;
	mailed: number;
	links: { page: string; replay: string };
}
