// Browser state of one workbench: the editor, the run, the inputs, the page's breakpoints and the
// last check, in one object. The page makes it, puts it in context, and every panel reads it from
// there (getWorkbench). Loads are awaited, never waited for with sleeps or polling.
import { getContext, setContext } from 'svelte';
import { CircuitEditor } from './circuit-editor.svelte';
import { RunSession } from './run-session.svelte';
import type { CircuitDocument } from '$lib/quantum/circuit';
import type { CheckReport } from '$lib/quantum/check/index';
import type { BreakpointSpec, RunRequestInputs } from '$lib/worker/protocol';

/** What a check looked at: a saved version as it is, or unsaved edits on top of one. */
export type CheckScope = { version: number; unsaved: boolean };

const KEY = Symbol('workbench');
/** Typing in an input or an edit re-runs after this pause. */
const RERUN_DELAY_MS = 200;

export class WorkbenchSession {
	readonly editor: CircuitEditor;
	readonly run = new RunSession();
	values = $state<Record<string, string>>({});
	superposed = $state<string[]>([]);
	breakpoints = $state<BreakpointSpec[]>([]);
	/** The last check of this page, with the body it checked (suspects are shown only while it holds). */
	lastCheck = $state.raw<{ report: CheckReport; body: string; scope: CheckScope } | null>(null);

	#timer: ReturnType<typeof setTimeout> | undefined;
	#pending: Promise<void> | null = null;
	#firstStep: number | undefined;

	constructor(doc: CircuitDocument, version: number, readOnly: boolean, start: { inputs?: Record<string, string>; superposed?: string[]; step?: number; breakpoints?: BreakpointSpec[] } = {}) {
		this.editor = new CircuitEditor(doc, version, readOnly);
		this.values = { ...(start.inputs ?? {}) };
		this.superposed = [...(start.superposed ?? [])];
		this.breakpoints = [...(start.breakpoints ?? [])];
		this.#firstStep = start.step;
	}

	/** Plain copies of the inputs (safe to post to a worker or send to the server). */
	get inputs(): RunRequestInputs {
		return { values: $state.snapshot(this.values), superposed: $state.snapshot(this.superposed) };
	}

	/** Run the document on the inputs now; resolves when the frames are there. */
	async reload(): Promise<void> {
		clearTimeout(this.#timer);
		const step = this.#firstStep;
		this.#firstStep = undefined;
		const p = this.run.load(this.editor.snapshot(), this.inputs, step);
		this.#pending = p;
		await p;
	}

	/** Re-run after a short pause (typing stays smooth); `settled()` waits for it. */
	scheduleReload(): void {
		clearTimeout(this.#timer);
		this.#pending = new Promise((resolve) => {
			this.#timer = setTimeout(() => void this.reload().then(resolve), RERUN_DELAY_MS);
		});
	}

	/** Resolves once the last requested run is loaded. */
	async settled(): Promise<void> {
		while (this.#pending) {
			const p = this.#pending;
			await p;
			if (p === this.#pending) this.#pending = null;
		}
	}

	setInputs(values: Record<string, string>, superposed: string[]): void {
		this.values = values;
		this.superposed = superposed;
	}

	/** Load a failing input from a check, then run to its first divergence. */
	async tryInput(input: Record<string, string>): Promise<void> {
		this.values = { ...this.values, ...input };
		this.superposed = this.superposed.filter((r) => !(r in input));
		await this.reload();
		await this.run.seek('start');
		await this.run.seek('divergence');
	}

	toBreakpoint(): Promise<void> {
		return this.run.seek('breakpoint', $state.snapshot(this.breakpoints) as BreakpointSpec[]);
	}

	/** A breakpoint at the current step (stop before the gate that leads here). */
	breakHere(): void {
		if (this.run.step > 0) this.breakpoints = [...this.breakpoints, { id: `bp-k${Date.now().toString(36)}`, kind: 'gate', gate: this.run.step - 1 }];
	}

	recordCheck(report: CheckReport, scope: CheckScope): void {
		this.lastCheck = { report, scope, body: JSON.stringify(this.editor.doc.body) };
	}

	destroy(): void {
		clearTimeout(this.#timer);
		this.run.destroy();
	}
}

export function setWorkbench(session: WorkbenchSession): WorkbenchSession {
	return setContext(KEY, session);
}

export function getWorkbench(): WorkbenchSession {
	const s = getContext<WorkbenchSession | undefined>(KEY);
	if (!s) throw new Error('getWorkbench() outside a workbench');
	return s;
}
