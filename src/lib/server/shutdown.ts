// A clean, quick exit on SIGINT and SIGTERM. adapter-node stops accepting requests, lets the
// running ones finish (at most SHUTDOWN_TIMEOUT seconds), closes idle connections and then emits
// `sveltekit:shutdown`. Until now nothing closed the database pool or the mail transport, so the
// process lingered until their idle timers ran out (about 30 s). Here each resource registers a
// closer; on `sveltekit:shutdown` they all run, and the process exits as soon as they are done
// (or after GRACE_MS, with a line in the log, if one of them hangs).

type Closer = { name: string; close: () => Promise<unknown> | unknown };

const closers: Closer[] = [];
export const GRACE_MS = 1500;

/** Register a resource to close at shutdown (the DB pool, the mail transport, a Redis connection). */
export function onShutdown(name: string, close: Closer['close']): void {
	closers.push({ name, close });
}

/** Close everything registered, at most `graceMs`; resolves to the names that did not close in time or failed. */
export async function closeAll(graceMs = GRACE_MS): Promise<string[]> {
	const pending = new Set(closers.map((c) => c.name));
	const done = Promise.all(
		closers.map(async (c) => {
			try {
				await c.close();
				pending.delete(c.name);
			} catch (e) {
				console.error(`shutdown: closing ${c.name} failed:`, (e as Error).message);
			}
		})
	);
	let timer: ReturnType<typeof setTimeout> | undefined;
	await Promise.race([done, new Promise((r) => (timer = setTimeout(r, graceMs)))]);
	clearTimeout(timer);
	return [...pending];
}

let installed = false;

/** Listen for adapter-node's `sveltekit:shutdown` once per process. */
export function installShutdown(): void {
	if (installed) return;
	installed = true;
	process.once('sveltekit:shutdown' as 'exit', async (reason: unknown) => {
		const stuck = await closeAll();
		if (stuck.length) console.error(`shutdown (${String(reason)}): ${stuck.join(', ')} did not close within ${GRACE_MS} ms; exiting anyway`);
		process.exit(0);
	});
}
