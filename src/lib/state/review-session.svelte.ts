// Browser state of the workbench's team tab: saved breakpoints of this circuit version, the trace
// saved for the current run, the captured snapshot and the report opened from it. Lives in the
// page (the tab's component is re-created whenever the tab is shown).
import { callApi } from '$lib/review/client';
import type { BreakpointAnnotatedResponse, BreakpointCreatedResponse, BreakpointListResponse, CommentCreatedResponse, ReportCreatedResponse, TraceCreatedResponse } from '$lib/api/types';
import { captureFrame, describeInputs } from '$lib/review/snapshot';
import { routes } from '$lib/routes';
import type { SavedBreakpointView } from '$lib/review/types';
import type { WorkbenchContext } from '$lib/state/workbench-context';
import type { BreakpointSpec } from '$lib/worker/protocol';
import type { Severity } from '$lib/review/reports';

type TraceRef = { id: string; key: string };

export class ReviewSession {
	saved = $state<SavedBreakpointView[]>([]);
	/** Page-local breakpoint id → the id it was saved as. */
	savedFrom = $state<Record<string, string>>({});
	trace = $state<TraceRef | null>(null);
	snapshot = $state.raw<{ blob: Blob; url: string; step: number } | null>(null);
	report = $state<{ id: string; href: string; mailed: number } | null>(null);
	busy = $state<string | null>(null);
	message = $state<{ text: string; error: boolean } | null>(null);

	/** The saved version everything made here attaches to; follows the workbench's saves. */
	version = $state(0);

	constructor(
		readonly slug: string,
		readonly circuit: { id: string; title: string },
		version: number,
		saved: SavedBreakpointView[],
		/** On a replay the trace already exists. */
		fixedTrace: { id: string } | null = null
	) {
		this.version = version;
		this.saved = saved;
		if (fixedTrace) this.trace = { id: fixedTrace.id, key: '*' };
		this.fixed = fixedTrace !== null;
	}
	readonly fixed: boolean;

	#say(text: string, error = false) {
		this.message = { text, error };
	}

	static runKey(ctx: WorkbenchContext): string {
		return JSON.stringify([ctx.inputs.values, [...ctx.inputs.superposed].sort()]);
	}

	isSaved(b: BreakpointSpec): boolean {
		return this.saved.some((s) => s.id === b.id) || b.id in this.savedFrom;
	}

	/**
	 * The workbench saved a new version: traces, breakpoints and reports made from now on belong
	 * to it, and the team's breakpoints shown are that version's.
	 */
	async followVersion(version: number): Promise<void> {
		if (this.fixed || version === this.version) return;
		this.version = version;
		this.trace = null;
		this.savedFrom = {};
		this.saved = [];
		await this.reload();
	}

	async reload(): Promise<void> {
		const r = await callApi<BreakpointListResponse>(`${routes.api.breakpoints(this.slug)}?circuit=${this.circuit.id}&version=${this.version}`);
		if (r.ok) this.saved = r.data.breakpoints;
	}

	async saveBreakpoint(b: BreakpointSpec, note: string): Promise<boolean> {
		const { id, note: _old, ...shape } = b;
		this.busy = 'breakpoint';
		const r = await callApi<BreakpointCreatedResponse>(routes.api.breakpoints(this.slug), {
			json: { circuitId: this.circuit.id, version: this.version, breakpoint: { ...shape, note } }
		});
		this.busy = null;
		if (!r.ok) return this.#say(r.message, true), false;
		this.savedFrom = { ...this.savedFrom, [id]: r.data.breakpoint.id };
		this.saved = [...this.saved, r.data.breakpoint];
		this.#say('Breakpoint saved with its note; the team sees it on this version and in replays.');
		return true;
	}

	async comment(breakpointId: string, body: string): Promise<string | null> {
		const r = await callApi<CommentCreatedResponse>(routes.api.breakpointComments(this.slug, breakpointId), { json: { body } });
		if (!r.ok) return r.message;
		await this.reload();
		return null;
	}

	async annotate(breakpointId: string, note: string, revision: number): Promise<string | null> {
		const r = await callApi<BreakpointAnnotatedResponse>(routes.api.breakpoint(this.slug, breakpointId), { method: 'PATCH', json: { note, revision } });
		if (!r.ok) return r.message;
		await this.reload();
		return null;
	}

	/** Save the workbench's current run as a trace of this version (once per set of inputs). */
	async saveTrace(ctx: WorkbenchContext, label = ''): Promise<string | null> {
		const key = ReviewSession.runKey(ctx);
		if (this.trace && (this.fixed || this.trace.key === key)) return this.trace.id;
		const s = ctx.run.summary;
		if (!s) return this.#say('Nothing has run yet.', true), null;
		if (ctx.editor.dirty) return this.#say('Save the circuit first: a trace refers to a saved version.', true), null;
		if (s.stopped) return this.#say(`This run stopped early (${s.stopped.reason}); a trace needs a complete run.`, true), null;
		this.busy = 'trace';
		const last = await ctx.run.peek(s.lastStep);
		const summary = {
			engine: last?.engine ?? 'ledger',
			gateCount: s.gateCount,
			lastStep: s.lastStep,
			qubitCount: s.qubitCount,
			registerValues: last?.registerValues ?? {},
			distributions: last?.distributions ?? {},
			firstDivergence: s.firstDivergence,
			divergenceCount: s.divergenceCount,
			handover: s.handover,
			stopped: s.stopped,
			keyframeChecksums: s.keyframeChecksums
		};
		const r = await callApi<TraceCreatedResponse>(routes.api.traces(this.slug), {
			json: { circuitId: this.circuit.id, version: this.version, label, inputs: ctx.inputs, summary }
		});
		this.busy = null;
		if (!r.ok) return this.#say(r.message, true), null;
		this.trace = { id: r.data.id, key };
		this.#say('Trace saved.');
		return r.data.id;
	}

	async capture(ctx: WorkbenchContext): Promise<void> {
		this.busy = 'snapshot';
		try {
			const blob = await captureFrame(ctx, {
				circuit: this.circuit.title,
				version: this.version,
				step: ctx.run.step,
				lastStep: ctx.run.lastStep,
				inputs: describeInputs(ctx.inputs)
			});
			if (this.snapshot) URL.revokeObjectURL(this.snapshot.url);
			this.snapshot = { blob, url: URL.createObjectURL(blob), step: ctx.run.step };
			this.message = null;
		} catch (e) {
			this.#say(`The frame could not be captured: ${(e as Error).message}`, true);
		} finally {
			this.busy = null;
		}
	}

	async openReport(ctx: WorkbenchContext, f: { title: string; description: string; severity: Severity; assigneeId: string | null; reviewerId: string | null }): Promise<boolean> {
		const traceId = await this.saveTrace(ctx);
		if (!traceId) return false;
		this.busy = 'report';
		const form = new FormData();
		const step = this.snapshot?.step ?? ctx.run.step;
		form.set('report', JSON.stringify({ traceId, step, ...f }));
		if (this.snapshot) form.set('snapshot', this.snapshot.blob, 'snapshot.png');
		const r = await callApi<ReportCreatedResponse>(routes.api.reports(this.slug), { form });
		this.busy = null;
		if (!r.ok) return this.#say(r.message, true), false;
		this.report = { id: r.data.id, href: r.data.links.page, mailed: r.data.mailed };
		this.#say(`Report opened${r.data.mailed ? `; ${r.data.mailed} e-mail${r.data.mailed === 1 ? '' : 's'} sent` : ''}.`);
		return true;
	}
}
