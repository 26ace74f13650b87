// Shapes the review pages (traces, breakpoints, reports) and the workbench's team tab receive (from load or the JSON API).
import type { BreakpointSpec } from '$lib/worker/protocol';

export type PersonRef = { id: string; name: string } | null;

export type SavedBreakpointView = {
	id: string;
	circuitId: string;
	versionId: string;
	/** The BreakpointSpec without id and note. */
	spec: Record<string, unknown> & { kind: BreakpointSpec['kind'] };
	/** Markdown as typed. */
	note: string;
	/** Sanitised on the server when saved. */
	noteHtml: string;
	author: PersonRef;
	revision: number;
	createdAt: string;
	updatedAt: string;
	comments: { id: string; author: PersonRef; bodyHtml: string; createdAt: string }[];
};

export type TeamMemberRef = { id: string; name: string; role: string };

/** A saved breakpoint as the workbench's page-local breakpoint (its note as plain markdown text). */
export function toBreakpointSpec(b: SavedBreakpointView): BreakpointSpec {
	return { ...(b.spec as object), id: b.id, note: b.note || undefined } as BreakpointSpec;
}

/** One line saying where a breakpoint stops. */
export function describeBreakpoint(spec: SavedBreakpointView['spec'], qubitLabel: (q: number | null) => string = (q) => (q === null ? 'any qubit' : `q${q}`)): string {
	const s = spec as unknown as Record<string, never>;
	switch (spec.kind) {
		case 'gate':
			return `at step ${s.gate}, before the gate of step ${s.gate + 1}`;
		case 'block':
			return `${s.at} of block ${s.itemId}`;
		case 'divergence':
			return `${qubitLabel(s.qubit)} leaves its expected angle by more than ${s.tolerance} turn`;
		default:
			return `${qubitLabel(s.qubit)} becomes entangled`;
	}
}

/** Ledger rows of one qubit up to a report's step (angles as exact turn fractions); server-made. */
export type LedgerExcerpt = {
	qubit: number;
	label: string;
	rows: { step: number; gate: string; line: number | null; amount: string | null; total: string | null; expected: string | null; parted: boolean }[];
	/** Rows of this qubit's ledger before the first one shown. */
	earlier: number;
};
