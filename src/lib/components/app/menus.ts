// Header menus close each other: opening one announces it, and every other menu closes.
const EVENT = 'orrery:menu-open';

/** Tell the other menus that `id` opened. */
export function announceMenuOpen(id: string): void {
	window.dispatchEvent(new CustomEvent(EVENT, { detail: id }));
}

/** Call `close` whenever another menu opens, or Escape is pressed; returns the cleanup. */
export function closeWhenOthersOpen(id: string, close: () => void): () => void {
	const onOpen = (e: Event) => (e as CustomEvent<string>).detail !== id && close();
	const onKey = (e: KeyboardEvent) => e.key === 'Escape' && close();
	window.addEventListener(EVENT, onOpen);
	window.addEventListener('keydown', onKey);
	return () => {
		window.removeEventListener(EVENT, onOpen);
		window.removeEventListener('keydown', onKey);
	};
}
