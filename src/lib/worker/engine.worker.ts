/// <reference lib="webworker" />
// The workbench's engine worker: all lowering and simulation happen here, off the page's thread.
import { handleRequest, type EngineSession } from './engine';
import type { WorkerRequest } from './protocol';

let session: EngineSession | null = null;

self.onmessage = (e: MessageEvent<WorkerRequest>) => {
	const id = e.data.id;
	const out = handleRequest(session, e.data, (done, total) => (self as unknown as Worker).postMessage({ id, type: 'progress', done, total }));
	session = out.session;
	(self as unknown as Worker).postMessage(out.response);
};
