// Promise-based client of the engine worker. A long load can be cancelled: the worker is
// terminated and a fresh one started, so the page never waits on a runaway computation.
import type { FrameView, WorkerRequest, WorkerResponse } from './protocol';

type Pending = { resolve: (r: WorkerResponse) => void; reject: (e: Error) => void; progress?: (done: number, total: number) => void; preview?: (frame: FrameView) => void };
type Body<T> = T extends unknown ? Omit<T, 'id'> : never;

export class EngineClient {
	#worker: Worker | null = null;
	#next = 1;
	#pending = new Map<number, Pending>();

	#spawn(): Worker {
		const w = new Worker(new URL('./engine.worker.ts', import.meta.url), { type: 'module' });
		w.onmessage = (e: MessageEvent<WorkerResponse>) => {
			const p = this.#pending.get(e.data.id);
			if (!p) return;
			if (e.data.type === 'progress') return p.progress?.(e.data.done, e.data.total);
			if (e.data.type === 'preview') return p.preview?.(e.data.frame);
			this.#pending.delete(e.data.id);
			p.resolve(e.data);
		};
		w.onerror = (e) => {
			for (const p of this.#pending.values()) p.reject(new Error(e.message || 'the engine worker failed'));
			this.#pending.clear();
		};
		return w;
	}

	/** Ask the worker; `progress` hears a check's progress, `preview` a load's step 0 before its answer. */
	request(body: Body<WorkerRequest>, progress?: (done: number, total: number) => void, preview?: (frame: FrameView) => void): Promise<WorkerResponse> {
		this.#worker ??= this.#spawn();
		const id = this.#next++;
		return new Promise((resolve, reject) => {
			this.#pending.set(id, { resolve, reject, progress, preview });
			try {
				this.#worker!.postMessage({ ...body, id } as WorkerRequest);
			} catch (e) {
				// A message that cannot be cloned (a reactive proxy, a function) must fail loudly here,
				// not leave the caller waiting.
				this.#pending.delete(id);
				reject(e instanceof Error ? e : new Error(String(e)));
			}
		});
	}

	/** Tell the worker something that has no answer (the page drew a load's step 0). */
	notify(body: Body<Extract<WorkerRequest, { type: 'drawn' }>>): void {
		this.#worker?.postMessage({ ...body, id: 0 } as WorkerRequest);
	}

	get busy(): boolean {
		return this.#pending.size > 0;
	}

	/** Stop whatever runs now; pending requests reject with "cancelled". */
	cancel(): void {
		this.#worker?.terminate();
		this.#worker = null;
		for (const p of this.#pending.values()) p.reject(new Error('cancelled'));
		this.#pending.clear();
	}

	destroy(): void {
		this.cancel();
	}
}
