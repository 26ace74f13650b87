// Browser state of one run in the workbench: talks to the engine worker, keeps the current
// frame and position, plays and pauses. Frames are replaced whole ($state.raw), never proxied.
import { EngineClient } from '$lib/worker/client';
import type { CircuitDocument } from '$lib/quantum/circuit';
import type { BreakpointSpec, FrameView, GateRow, LedgerView, RunRequestInputs, RunSummary, SeekKind } from '$lib/worker/protocol';

export class RunSession {
	summary = $state.raw<RunSummary | null>(null);
	frame = $state.raw<FrameView | null>(null);
	/**
	 * Step 0 of the first run while the rest is computed (the worker's first message): the board
	 * draws it; everything else waits for `frame` and `summary`. Null once the run is loaded.
	 */
	preview = $state.raw<FrameView | null>(null);
	ledger = $state.raw<LedgerView | null>(null);
	error = $state<{ message: string; path?: string } | null>(null);
	loading = $state(false);
	playing = $state(false);
	/** Steps per second while playing. */
	speed = $state(4);
	lastSeekReason = $state<string | null>(null);
	lastBreakpointId = $state<string | null>(null);
	selectedQubit = $state<number | null>(null);

	#client: EngineClient | null = null;
	#timer: ReturnType<typeof setTimeout> | null = null;
	#loadSeq = 0;
	#busyFrame = false;

	get step(): number {
		return this.frame?.step ?? 0;
	}
	get lastStep(): number {
		return this.summary?.lastStep ?? 0;
	}

	#c(): EngineClient {
		return (this.#client ??= new EngineClient());
	}

	/** Lower and run the circuit on the inputs; keeps the current step when it still exists. */
	async load(doc: CircuitDocument, inputs: RunRequestInputs, atStep?: number): Promise<void> {
		const seq = ++this.#loadSeq;
		this.pause();
		this.loading = true;
		this.error = null;
		// A preview only where nothing is shown yet and the run opens at step 0 (a replay that opens
		// at a later step waits for its own frame).
		const wantsPreview = !this.summary && !this.frame && (atStep ?? 0) === 0;
		try {
			// Plain copies: postMessage cannot clone Svelte's reactive proxies.
			const res = await this.#c().request({ type: 'load', doc: $state.snapshot(doc) as CircuitDocument, inputs: $state.snapshot(inputs) as RunRequestInputs, preview: wantsPreview }, undefined, (f) => {
				if (wantsPreview && seq === this.#loadSeq) this.preview = f;
			});
			this.preview = null;
			if (seq !== this.#loadSeq) return;
			if (res.type === 'error') {
				this.error = { message: res.message, path: res.path };
				this.summary = null;
				this.frame = null;
				return;
			}
			if (res.type !== 'loaded') return;
			this.summary = res.summary;
			const want = Math.min(atStep ?? this.frame?.step ?? 0, res.summary.lastStep);
			this.frame = want === 0 ? res.frame : await this.#frame(want);
			if (this.selectedQubit !== null && this.selectedQubit >= res.summary.qubitCount) this.selectedQubit = null;
			await this.refreshLedger();
		} catch (e) {
			this.preview = null;
			if ((e as Error).message !== 'cancelled') this.error = { message: (e as Error).message };
		} finally {
			if (seq === this.#loadSeq) this.loading = false;
		}
	}

	/** The board has drawn `preview`: the worker may compute the run now (it waits for this, or a while). */
	previewDrawn(preview: FrameView): void {
		if (this.preview === preview) this.#client?.notify({ type: 'drawn' });
	}

	/** Stop a long load (the worker is replaced). */
	cancel(): void {
		this.#loadSeq++;
		this.#client?.cancel();
		this.loading = false;
		this.pause();
		this.error = { message: 'Run cancelled. Change the circuit or inputs to run again.' };
	}

	async #frame(step: number): Promise<FrameView | null> {
		const res = await this.#c().request({ type: 'frame', step });
		return res.type === 'frame' ? res.frame : null;
	}

	/** The frame at `step` without moving the view (e.g. the final frame for a saved trace). */
	async peek(step: number): Promise<FrameView | null> {
		if (!this.summary) return null;
		return this.#frame(Math.max(0, Math.min(this.summary.lastStep, Math.round(step))));
	}

	async goto(step: number): Promise<void> {
		if (!this.summary) return;
		const s = Math.max(0, Math.min(this.summary.lastStep, Math.round(step)));
		const f = await this.#frame(s);
		if (f) this.frame = f;
	}

	async seek(kind: SeekKind, breakpoints: BreakpointSpec[] = []): Promise<void> {
		if (!this.summary) return;
		const res = await this.#c().request({ type: 'seek', from: this.step, kind, breakpoints: $state.snapshot(breakpoints) as BreakpointSpec[] });
		if (res.type !== 'seek') return;
		this.lastSeekReason = res.reason;
		this.lastBreakpointId = res.breakpointId;
		await this.goto(res.step);
		// Arriving at a divergence with nothing selected: select the diverging qubit, so its values
		// are written on the board and the ledger lists its contributions at once.
		if (kind === 'divergence' && this.selectedQubit === null && this.frame?.step === res.step && this.frame.diverged.length) await this.select(this.frame.diverged[0]);
	}

	async gates(from: number, to: number): Promise<GateRow[]> {
		if (!this.summary) return [];
		const res = await this.#c().request({ type: 'gates', from, to });
		return res.type === 'gates' ? res.gates : [];
	}

	async select(qubit: number | null): Promise<void> {
		this.selectedQubit = qubit;
		await this.refreshLedger();
	}

	async refreshLedger(): Promise<void> {
		if (this.selectedQubit === null || !this.summary) {
			this.ledger = null;
			return;
		}
		const res = await this.#c().request({ type: 'ledger', qubit: this.selectedQubit, step: this.step });
		if (res.type === 'ledger') this.ledger = res.ledger;
	}

	play(): void {
		if (!this.summary || this.playing) return;
		if (this.step >= this.lastStep) void this.goto(0);
		this.playing = true;
		const tick = async () => {
			if (!this.playing) return;
			if (this.#busyFrame) {
				this.#timer = setTimeout(tick, 10);
				return;
			}
			this.#busyFrame = true;
			await this.goto(this.step + 1);
			this.#busyFrame = false;
			if (this.step >= this.lastStep) this.playing = false;
			else this.#timer = setTimeout(tick, 1000 / this.speed);
		};
		this.#timer = setTimeout(tick, 0);
	}

	pause(): void {
		this.playing = false;
		if (this.#timer) clearTimeout(this.#timer);
		this.#timer = null;
	}

	destroy(): void {
		this.pause();
		this.#client?.destroy();
		this.#client = null;
	}
}
