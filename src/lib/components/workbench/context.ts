import type { CircuitEditor } from '$lib/state/circuit-editor.svelte';
import type { RunSession } from '$lib/state/run-session.svelte';
import type { DialScene } from '$lib/components/dials/dial-scene';
import type { BreakpointSpec, RunRequestInputs } from '$lib/worker/protocol';

/** Live workbench state handed to the team tab (traces, snapshots, reports). Read-only views. */
export interface WorkbenchContext {
	readonly run: RunSession;
	readonly editor: CircuitEditor;
	readonly breakpoints: BreakpointSpec[];
	readonly inputs: RunRequestInputs;
	readonly scene: DialScene | null;
	/** The element holding the dial board and qubit table (what a snapshot captures). */
	readonly frameArea: HTMLElement | null;
}
