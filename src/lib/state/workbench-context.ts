import type { CircuitEditor } from './circuit-editor.svelte';
import type { RunSession } from './run-session.svelte';
import type { BreakpointSpec, RunRequestInputs } from '$lib/worker/protocol';

/** What state needs of the dial board: draw it once more now (before a snapshot copies the canvas). */
export interface Redrawable {
	render(): void;
}

/** Live workbench state handed to the team tab (traces, snapshots, reports). Read-only views. */
export interface WorkbenchContext {
	readonly run: RunSession;
	readonly editor: CircuitEditor;
	readonly breakpoints: BreakpointSpec[];
	readonly inputs: RunRequestInputs;
	readonly scene: Redrawable | null;
	/** The element holding the dial board and qubit table (what a snapshot captures). */
	readonly frameArea: HTMLElement | null;
}
