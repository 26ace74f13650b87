// Orrery's own keyboard map for the workbench (shown in the help overlay).
export type ShortcutAction =
	| 'forward'
	| 'back'
	| 'over'
	| 'out'
	| 'next-boundary'
	| 'prev-boundary'
	| 'to-breakpoint'
	| 'to-divergence'
	| 'play'
	| 'start'
	| 'end'
	| 'undo'
	| 'redo'
	| 'toggle-breakpoint'
	| 'help';

export const SHORTCUTS: { keys: string; action: ShortcutAction; text: string }[] = [
	{ keys: 'l', action: 'forward', text: 'one gate forward' },
	{ keys: 'h', action: 'back', text: 'one gate back' },
	{ keys: 'j', action: 'over', text: 'step over the next block or rotation' },
	{ keys: 'k', action: 'out', text: 'step out of the current block' },
	{ keys: 'n', action: 'next-boundary', text: 'next block boundary' },
	{ keys: 'p', action: 'prev-boundary', text: 'previous block boundary' },
	{ keys: 'g', action: 'to-breakpoint', text: 'run to the next breakpoint' },
	{ keys: 'd', action: 'to-divergence', text: 'run to the next divergence' },
	{ keys: 'Space', action: 'play', text: 'play / pause' },
	{ keys: '0', action: 'start', text: 'back to the inputs (step 0)' },
	{ keys: '$', action: 'end', text: 'to the last step' },
	{ keys: 'm', action: 'toggle-breakpoint', text: 'breakpoint on the gate just run' },
	{ keys: 'Ctrl+Z', action: 'undo', text: 'undo an edit' },
	{ keys: 'Ctrl+Shift+Z / Ctrl+Y', action: 'redo', text: 'redo' },
	{ keys: '?', action: 'help', text: 'show or hide this list' }
];

/** The action for a key event, or null. Ignores keys typed into fields. */
export function actionForKey(e: KeyboardEvent): ShortcutAction | null {
	const t = e.target as HTMLElement | null;
	// Typing goes to fields; checkboxes, radios, ranges and buttons let the keys through.
	const typing = t instanceof HTMLInputElement ? !['checkbox', 'radio', 'range', 'button', 'submit', 'reset'].includes(t.type) : false;
	if (t && (typing || t.tagName === 'TEXTAREA' || t.tagName === 'SELECT' || t.isContentEditable)) return null;
	// Space on a button presses it; leave that to the browser.
	if (e.key === ' ' && t && (t.tagName === 'BUTTON' || (t instanceof HTMLInputElement && t.type !== 'range'))) return null;
	const mod = e.ctrlKey || e.metaKey;
	if (mod && (e.key === 'z' || e.key === 'Z')) return e.shiftKey ? 'redo' : 'undo';
	if (mod && e.key === 'y') return 'redo';
	if (mod || e.altKey) return null;
	if (e.key === ' ') return 'play';
	return SHORTCUTS.find((s) => s.keys === e.key && s.keys.length === 1)?.action ?? null;
}
