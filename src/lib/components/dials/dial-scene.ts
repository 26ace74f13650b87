// The pixi.js scene behind DialBoard.svelte. Imported dynamically inside onMount only: pixi
// touches `navigator` on import, which would break server rendering.
//
// Angles are in turns; a dial's 0 is at twelve o'clock and angles grow clockwise, as a
// reader expects of a dial (the direction is stated in the board's legend).
import { Application, BitmapText, Circle, Container, extensions, ExtensionType, GlLimitsSystem, Graphics, GraphicsContext, Text, type FederatedPointerEvent } from 'pixi.js';
// The pages' content security policy has no 'unsafe-eval': this swaps pixi's generated shader
// and uniform code (new Function) for prebuilt functions. Imported after pixi.js, before any Application.
import 'pixi.js/unsafe-eval';
import {
	dialAngleText,
	groupByRegister,
	isDiverged,
	layoutDials,
	shortestTurn,
	visibleTickCount,
	type DialLayout,
	type DialQubit
} from '$lib/dials/dial-model';

/**
 * Batches of at most 4 textures (the board draws with two or three: the faces' cache and the
 * labels' glyphs). pixi's batch programs then choose among 4 texture slots, not 16, and software
 * WebGL compiles them much faster: the first frame waited about 0.25 s for them. The pixels are
 * the same; a frame with more textures at once would only take more draw calls.
 */
class DialLimits extends GlLimitsSystem {
	static extension = { type: [ExtensionType.WebGLSystem], name: 'limits' } as const;
	contextChange(): void {
		super.contextChange();
		this.maxBatchableTextures = Math.min(this.maxBatchableTextures, 4);
	}
}
// Before the first renderer: the first system named 'limits' is the one renderers use.
extensions.remove(GlLimitsSystem);
extensions.add(DialLimits);

const C = {
	background: 0x151a24,
	panel: 0x1f2533,
	ring: 0x2d3546,
	tick: 0x9aa0ad,
	paper: 0xf6f1e7,
	needle: 0xf1dccb,
	expected: 0x2f7d6d,
	expectedLight: 0xcfe6df,
	diverged: 0xc2362b,
	selected: 0xb8652f,
	header: 0x9aa0ad
} as const;

const RADIUS = 40;
/**
 * A board narrower than this (a phone) lays its dials out NARROW_PER_ROW a row and starts with
 * them filling its width, from the top, instead of shrinking the whole board into view: the dials
 * stay large enough to read, and the rest is a drag away.
 */
const NARROW = 600;
const NARROW_PER_ROW = 3;
/** Largest first scale of a narrow board: a dial of radius 40 is drawn at most 144 px across. */
const NARROW_MOST = 1.8;
const ANIMATION_MS = 220;

interface Dial {
	q: DialQubit;
	root: Container;
	/** Face, hub and title: cached as one texture, redrawn only when the face changes. */
	still: Container;
	face: Graphics;
	/** Divergence arc: redrawn only when a move ends. */
	arc: Graphics;
	/** Needle drawn once pointing up; turned and scaled by its transform, coloured by tint. */
	needle: Graphics;
	/** Holds the expected-angle marker at twelve o'clock; turned by its transform. */
	expected: Container;
	title: BitmapText;
	sub: BitmapText;
	shown: number; // angle currently drawn (turns)
	from: number;
	to: number;
	t0: number;
	animating: boolean;
	faceKey: string;
}

export interface DialSceneOptions {
	/** Told the dials' on-screen diameter in CSS pixels whenever the view's scale changes. */
	onscale?: (dialPx: number) => void;
	onselect?: (qubit: number) => void;
	onhover?: (qubit: number | null, x: number, y: number) => void;
}

export interface DialScene {
	update(qubits: DialQubit[], selected: number | null, animate: boolean): void;
	/** Average ms between rendered frames over the last second (for the benchmark). */
	frameStats(): { frames: number; avgMs: number; maxMs: number };
	/** Zoom by `factor` around the given dials (the selected or diverging ones), else the centre. */
	zoom(factor: number, around?: number[]): void;
	/** The whole board in view. */
	resetView(): void;
	/** These dials in view, as large as they fit (at most 2×). */
	focus(qubits: number[]): void;
	/** Draws now so a snapshot of the canvas holds the current frame. */
	render(): void;
	canvas: HTMLCanvasElement;
	destroy(): void;
}

const TITLE_STYLE = { fontFamily: 'JetBrains Mono Variable', fontSize: 13, fill: C.paper } as const;
const SUB_STYLE = { fontFamily: 'JetBrains Mono Variable', fontSize: 12, fill: C.tick, align: 'center' } as const;
const HEADER_STYLE = { fontFamily: 'JetBrains Mono Variable', fontSize: 14, fill: C.header, fontWeight: '600' } as const;

export async function createDialScene(host: HTMLElement, opts: DialSceneOptions = {}): Promise<DialScene> {
	const app = new Application();
	await app.init({
		resizeTo: host,
		background: C.background,
		antialias: false,
		preserveDrawingBuffer: true,
		preference: 'webgl',
		autoDensity: true,
		resolution: Math.min(2, globalThis.devicePixelRatio || 1),
		// We draw on demand (below): a board standing still costs nothing, which matters most
		// where WebGL runs in software.
		autoStart: false
	});
	app.ticker.stop();
	host.appendChild(app.canvas);
	app.canvas.setAttribute('aria-hidden', 'true');

	const world = new Container();
	app.stage.addChild(world);
	// Two render groups: the faces never move, so their draw instructions are kept between
	// frames; only the needles' group is rebuilt while they turn.
	const facesLayer = new Container({ isRenderGroup: true });
	const liveLayer = new Container({ isRenderGroup: true });
	world.addChild(facesLayer, liveLayer);
	app.stage.eventMode = 'static';
	app.stage.hitArea = app.screen;

	const dials = new Map<number, Dial>();
	/** One face drawing per look (kind, level, bit, selected, small, diverged), shared by the dials. */
	const faces = new Map<string, GraphicsContext>();
	/** What a face shows until drawFace gives it its look (shared, so no dial owns a context). */
	const blank = new GraphicsContext();
	const headers: Text[] = [];
	let layout: DialLayout | null = null;
	let narrow = false;
	let lastQubits: DialQubit[] = [];
	let structureKey = '';
	let selected: number | null = null;
	let lodSmall = false;
	// Faces are cached as one texture for the whole board when it fits a texture (one quad to
	// draw per frame), else one texture per dial. Software WebGL spends most of a frame on them.
	let layerCache: 'whole' | 'each' = 'each';
	let facesDirty = false;
	const MAX_TEXTURE = 8192;
	const cacheResolution = () => Math.min(2, Math.max(1, world.scale.x * (globalThis.devicePixelRatio || 1)));
	function cacheWholeLayer(): boolean {
		if (!layout) return false;
		const res = cacheResolution();
		if (layout.width * res > MAX_TEXTURE || layout.height * res > MAX_TEXTURE) return false;
		if (facesLayer.isCachedAsTexture) facesLayer.cacheAsTexture(false);
		// No multisampling: in software WebGL resolving it cost the first frame 15 to 20 % of the
		// time to first dials, and at the cache's resolution the faces look the same.
		facesLayer.cacheAsTexture({ resolution: res, antialias: false });
		return true;
	}

	// --- the frame loop: advance animations, render only when something changed ---
	const intervals: number[] = [];
	let lastFrame = performance.now();
	let dirty = true;
	let raf = 0;
	const frame = (now: number) => {
		intervals.push(now - lastFrame);
		lastFrame = now;
		if (intervals.length > 240) intervals.shift();
		if (facesDirty) {
			facesDirty = false;
			if (facesLayer.isCachedAsTexture) facesLayer.updateCacheTexture();
			dirty = true;
		}
		if (step(now) || dirty) {
			dirty = false;
			app.renderer.render(app.stage);
		}
		raf = requestAnimationFrame(frame);
	};
	raf = requestAnimationFrame(frame);
	const invalidate = () => (dirty = true);

	function drawFace(d: Dial) {
		const q = d.q;
		const isSel = selected === q.qubit;
		const key = `${q.kind}|${q.level ?? ''}|${q.bit ?? ''}|${isSel}|${lodSmall}|${isDiverged(q)}`;
		if (key === d.faceKey) return;
		d.faceKey = key;
		// Dials that look alike share one drawing: its geometry is built once, not once a dial.
		let g = faces.get(key);
		if (!g) {
			g = new GraphicsContext();
			faces.set(key, g);
			drawFaceInto(g, q, isSel);
		}
		d.face.context = g;
		if (layerCache === 'whole') facesDirty = true;
		else if (d.still.isCachedAsTexture) d.still.updateCacheTexture();
		else d.still.cacheAsTexture({ resolution: 2, antialias: true });
	}

	function drawFaceInto(g: GraphicsContext, q: DialQubit, isSel: boolean) {
		g.circle(0, 0, RADIUS + 6).fill({ color: C.panel });
		g.circle(0, 0, RADIUS).stroke({ width: isSel ? 3 : 2, color: isSel ? C.selected : C.ring });
		if (isDiverged(q)) g.circle(0, 0, RADIUS + 4).stroke({ width: 1.5, color: C.diverged, alpha: 0.9 });
		if (q.kind !== 'classical' && q.level !== undefined && !lodSmall) {
			const n = visibleTickCount(q.level, RADIUS);
			for (let i = 0; i < n; i++) {
				const a = (i / n) * Math.PI * 2 - Math.PI / 2;
				const major = i === 0;
				const r0 = major ? RADIUS - 7 : RADIUS - 4;
				g.moveTo(Math.cos(a) * r0, Math.sin(a) * r0).lineTo(Math.cos(a) * RADIUS, Math.sin(a) * RADIUS);
			}
			g.stroke({ width: 1, color: C.tick, alpha: 0.8 });
		}
		if (q.kind === 'classical') drawBitGlyph(g, q.bit === 1 ? 1 : 0);
		else g.circle(0, 0, 3.5).fill({ color: C.paper });
	}

	// A classical bit is its digit drawn in a small square: 1 on a filled square, 0 on an open one.
	// Stroked shapes rather than text, so the cached face needs no font.
	function drawBitGlyph(g: GraphicsContext, bit: 0 | 1) {
		const h = 12;
		if (bit === 1) {
			g.roundRect(-h, -h, 2 * h, 2 * h, 3).fill({ color: C.paper });
			g.moveTo(-3, -4).lineTo(1, -7).lineTo(1, 7).moveTo(-3, 7).lineTo(5, 7).stroke({ width: 2.2, color: C.panel, cap: 'round', join: 'round' });
		} else {
			g.roundRect(-h, -h, 2 * h, 2 * h, 3).stroke({ width: 2, color: C.tick });
			g.ellipse(0, 0, 4.5, 7).stroke({ width: 2.2, color: C.paper });
		}
	}

	// Per frame only transforms change (rotation, scale, tint): no geometry is rebuilt while a
	// needle moves, which keeps hundreds of dials cheap.
	function drawHand(d: Dial) {
		const q = d.q;
		const classical = q.kind === 'classical';
		d.needle.visible = !classical;
		d.expected.visible = !classical && q.expected !== undefined;
		d.arc.clear();
		if (classical) return;
		const diverged = isDiverged(q);
		d.needle.rotation = d.shown * Math.PI * 2;
		d.needle.scale.y = Math.max(0.08, Math.min(1, q.coherence ?? 1));
		d.needle.tint = diverged ? C.diverged : C.needle;
		if (q.expected !== undefined) {
			d.expected.rotation = q.expected * Math.PI * 2;
			if (diverged && !d.animating) {
				// The arc from expected to actual, the short way round.
				const delta = shortestTurn(q.expected, d.shown);
				const a0 = q.expected * Math.PI * 2 - Math.PI / 2;
				const a1 = a0 + delta * Math.PI * 2;
				d.arc.arc(0, 0, RADIUS - 10, Math.min(a0, a1), Math.max(a0, a1)).stroke({ width: 4, color: C.diverged, alpha: 0.85 });
			}
		}
	}

	function turnNeedle(d: Dial) {
		d.needle.rotation = d.shown * Math.PI * 2;
	}

	// Every dial writes its actual angle; the selected and the diverging ones also write the
	// expected one on a second line, so a reader needs no hover to compare them.
	function subText(q: DialQubit): string {
		if (q.kind === 'classical') return `bit ${q.bit}`;
		const ang = dialAngleText(q);
		const focus = selected === q.qubit || isDiverged(q);
		if (focus && q.expectedText !== undefined) return `is ${ang}\nwants ${q.expectedText}`;
		// The selected dial without a ring marker says so (the board's header and the ledger say why).
		if (focus) return `is ${ang}\nno expected angle`;
		return `${q.level !== undefined ? `m=${q.level} ` : ''}${ang}`;
	}

	function build(qubits: DialQubit[]) {
		for (const d of dials.values()) {
			d.still.destroy({ children: true });
			d.root.destroy({ children: true });
		}
		dials.clear();
		for (const h of headers) h.destroy();
		headers.length = 0;
		const groups = groupByRegister(qubits);
		lastQubits = qubits;
		narrow = app.screen.width < NARROW;
		layout = layoutDials(groups, narrow ? 16 + NARROW_PER_ROW * 132 : Math.max(240, app.screen.width / world.scale.x));
		for (const h of layout.headers) {
			const t = new Text({ text: h.register, style: HEADER_STYLE });
			t.position.set(h.x, h.y);
			world.addChild(t);
			headers.push(t);
		}
		const pos = new Map(layout.positions.map((p) => [p.qubit, p]));
		for (const q of qubits) {
			const p = pos.get(q.qubit)!;
			const root = new Container();
			root.position.set(p.x, p.y);
			root.eventMode = 'static';
			root.cursor = 'pointer';
			root.hitArea = new Circle(0, 0, RADIUS + 6);
			const face = new Graphics(blank);
			const arc = new Graphics();
			const needle = new Graphics();
			needle.moveTo(0, 0).lineTo(0, -(RADIUS - 5)).stroke({ width: 3, color: 0xffffff, cap: 'round' });
			const expected = new Container();
			expected.addChild(new Graphics().circle(0, -RADIUS, 5).stroke({ width: 2, color: C.expectedLight }));
			const title = new BitmapText({ text: `${q.register}[${q.index}]`, style: TITLE_STYLE });
			title.anchor.set(0.5, 0);
			title.position.set(0, RADIUS + 8);
			const sub = new BitmapText({ text: '', style: SUB_STYLE });
			sub.anchor.set(0.5, 0);
			sub.position.set(0, RADIUS + 24);
			const still = new Container();
			still.addChild(face, title);
			still.position.set(p.x, p.y);
			facesLayer.addChild(still);
			root.addChild(arc, expected, needle, sub);
			const qubit = q.qubit;
			root.on('pointertap', () => opts.onselect?.(qubit));
			root.on('pointerover', (e: FederatedPointerEvent) => opts.onhover?.(qubit, e.global.x, e.global.y));
			root.on('pointerout', () => opts.onhover?.(null, 0, 0));
			liveLayer.addChild(root);
			const a = q.angle ?? 0;
			dials.set(q.qubit, { q, root, still, face, arc, needle, expected, title, sub, shown: a, from: a, to: a, t0: 0, animating: false, faceKey: '' });
		}
		if (facesLayer.isCachedAsTexture) facesLayer.cacheAsTexture(false);
		layerCache = 'each';
		const whole = layout.width * cacheResolution() <= MAX_TEXTURE && layout.height * cacheResolution() <= MAX_TEXTURE;
		if (whole) {
			layerCache = 'whole';
			for (const d of dials.values()) drawFace(d);
			cacheWholeLayer();
		}
		// Every dial visible at once, centred: a board taller than the view is shrunk to fit, a small
		// one on a large screen is enlarged (up to START_MOST) so the dials are readable from a chair.
		fitAll();
	}

	/** Advance every moving needle; true when anything moved. */
	function step(now: number): boolean {
		let moved = false;
		for (const d of dials.values()) {
			if (!d.animating || !d.root.visible) continue;
			moved = true;
			const t = Math.min(1, (now - d.t0) / ANIMATION_MS);
			const e = 1 - (1 - t) * (1 - t) * (1 - t);
			d.shown = (((d.from + shortestTurn(d.from, d.to) * e) % 1) + 1) % 1;
			if (t >= 1) {
				d.shown = d.to;
				d.animating = false;
				drawHand(d);
			} else turnNeedle(d);
		}
		return moved;
	}

	let toldScale = 0;
	function cull() {
		invalidate();
		const s = world.scale.x;
		if (s !== toldScale) {
			toldScale = s;
			opts.onscale?.(2 * RADIUS * s);
		}
		const small = RADIUS * s < 14;
		const lodChanged = small !== lodSmall;
		lodSmall = small;
		const x0 = -world.x / s - RADIUS * 2;
		const y0 = -world.y / s - RADIUS * 2;
		const x1 = x0 + app.screen.width / s + RADIUS * 4;
		const y1 = y0 + app.screen.height / s + RADIUS * 4;
		for (const d of dials.values()) {
			const { x, y } = d.root.position;
			const vis = x >= x0 && x <= x1 && y >= y0 && y <= y1;
			d.root.visible = vis;
			// With one texture for all faces, every face stays in it; culling is for the needles.
			if (layerCache === 'each') d.still.visible = vis;
			if (d.title.visible === small) {
				d.title.visible = !small;
				if (layerCache === 'whole') facesDirty = true;
			}
			d.sub.visible = !small;
			if (vis && (lodChanged || d.faceKey === '')) {
				drawFace(d);
				drawHand(d);
			}
		}
	}

	// --- zoom (wheel, around the pointer) and pan (drag on the background) ---
	function zoomAt(factor: number, cx: number, cy: number) {
		const s0 = world.scale.x;
		const s1 = Math.min(3, Math.max(0.15, s0 * factor));
		world.x = cx - ((cx - world.x) * s1) / s0;
		world.y = cy - ((cy - world.y) * s1) / s0;
		world.scale.set(s1);
		// Re-cache the faces at a resolution that stays sharp at this zoom (or per dial when too big).
		if (layerCache === 'whole' && !cacheWholeLayer()) {
			facesLayer.cacheAsTexture(false);
			layerCache = 'each';
			for (const d of dials.values()) d.faceKey = '';
		}
		cull();
	}
	/** Width the dials take (the layout wraps at the view's width but a short register ends early). */
	function usedWidth(): number {
		if (!layout) return 1;
		let right = 0;
		for (const p of layout.positions) right = Math.max(right, p.x + layout.cell / 2);
		return right + 8;
	}
	/** Until someone zooms or pans, the board keeps every dial in view as its box changes size. */
	let chosenView = false;
	function fitAll() {
		chosenView = false;
		if (!layout) return;
		if (narrow) {
			// The dials fill the width, the first row at the top.
			const w = app.screen.width;
			const used = Math.max(usedWidth(), 1);
			const s = Math.max(0.15, Math.min(NARROW_MOST, w / used));
			zoomAt(s / world.scale.x, 0, 0);
			world.x = (w - s * used) / 2;
			world.y = 0;
			cull();
		} else showBox(0, 0, Math.max(usedWidth(), 1), layout.height + FIT_FOOT, START_MOST);
	}
	/** Room under the last row when fitting: its second label line and the zoom buttons over the corner. */
	const FIT_FOOT = 44;
	/** Largest first scale of a board: dials of radius 40 px are drawn at most 64 px. */
	const START_MOST = 1.6;
	/** Scale and move so the world box is centred in view, no larger than `most`. */
	function showBox(x0: number, y0: number, x1: number, y1: number, most: number) {
		const w = app.screen.width;
		const h = app.screen.height;
		const s = Math.max(0.15, Math.min(most, w / (x1 - x0), h / (y1 - y0)));
		zoomAt(s / world.scale.x, 0, 0);
		world.x = w / 2 - (s * (x0 + x1)) / 2;
		world.y = h / 2 - (s * (y0 + y1)) / 2;
		cull();
	}
	function centreOf(qs: number[]): { x: number; y: number } | null {
		const ps = qs.map((q) => dials.get(q)?.root.position).filter((p) => p !== undefined);
		if (!ps.length) return null;
		return { x: ps.reduce((a, p) => a + p.x, 0) / ps.length, y: ps.reduce((a, p) => a + p.y, 0) / ps.length };
	}
	const onWheel = (e: WheelEvent) => {
		e.preventDefault();
		chosenView = true;
		const r = app.canvas.getBoundingClientRect();
		zoomAt(e.deltaY < 0 ? 1.12 : 1 / 1.12, e.clientX - r.left, e.clientY - r.top);
	};
	app.canvas.addEventListener('wheel', onWheel, { passive: false });
	let drag: { x: number; y: number; wx: number; wy: number } | null = null;
	app.stage.on('pointerdown', (e: FederatedPointerEvent) => {
		drag = { x: e.global.x, y: e.global.y, wx: world.x, wy: world.y };
	});
	app.stage.on('pointermove', (e: FederatedPointerEvent) => {
		if (!drag) return;
		chosenView = true;
		world.x = drag.wx + e.global.x - drag.x;
		world.y = drag.wy + e.global.y - drag.y;
		cull();
	});
	const endDrag = () => (drag = null);
	app.stage.on('pointerup', endDrag);
	app.stage.on('pointerupoutside', endDrag);
	// pixi's resizeTo follows the window only; the host also changes with the page's layout (a
	// side folded, the run summary growing), and a canvas left taller than its box covered it.
	const resizing = new ResizeObserver(() => {
		app.resize();
		// A hidden board (the table view) has no size: keep its view for when it comes back.
		if (app.screen.width === 0 || app.screen.height === 0) return;
		// Crossing the phone width changes how many dials a row holds: lay the board out anew.
		if (layout && (app.screen.width < NARROW) !== narrow) {
			structureKey = '';
			scene.update(lastQubits, selected, false);
		} else if (!chosenView) fitAll();
	});
	resizing.observe(host);
	app.renderer.on('resize', () => cull());

	const scene: DialScene = {
		canvas: app.canvas,
		update(qubits, sel, animate) {
			const key = qubits.map((q) => `${q.qubit}:${q.register}:${q.index}`).join(',');
			selected = sel;
			if (key !== structureKey) {
				structureKey = key;
				build(qubits);
			}
			const now = performance.now();
			for (const q of qubits) {
				const d = dials.get(q.qubit);
				if (!d) continue;
				d.q = q;
				const target = q.angle ?? 0;
				if (animate && Math.abs(shortestTurn(d.shown, target)) > 1e-12) {
					d.from = d.shown;
					d.to = target;
					d.t0 = now;
					d.animating = true;
				} else {
					d.shown = d.to = target;
					d.animating = false;
				}
				invalidate();
				const text = subText(q);
				if (d.sub.text !== text) d.sub.text = text;
				if (d.root.visible) {
					drawFace(d);
					drawHand(d);
				} else d.faceKey = '';
			}
		},
		frameStats() {
			const xs = intervals.slice(-120);
			const sum = xs.reduce((a, b) => a + b, 0);
			return { frames: xs.length, avgMs: xs.length ? sum / xs.length : 0, maxMs: xs.length ? Math.max(...xs) : 0 };
		},
		zoom(f, around = []) {
			chosenView = true;
			const c = centreOf(around);
			if (!c) return zoomAt(f, app.screen.width / 2, app.screen.height / 2);
			// Keep those dials in view: zoom around where they are on screen.
			zoomAt(f, world.x + c.x * world.scale.x, world.y + c.y * world.scale.x);
		},
		resetView() {
			fitAll();
		},
		focus(qs) {
			const ps = qs.map((q) => dials.get(q)?.root.position).filter((p) => p !== undefined);
			if (!ps.length || !layout) return;
			chosenView = true;
			const h = layout.cell / 2;
			showBox(Math.min(...ps.map((p) => p.x)) - h, Math.min(...ps.map((p) => p.y)) - h, Math.max(...ps.map((p) => p.x)) + h, Math.max(...ps.map((p) => p.y)) + h + 16, 2);
		},
		render() {
			if (facesDirty && facesLayer.isCachedAsTexture) facesLayer.updateCacheTexture();
			facesDirty = false;
			app.renderer.render(app.stage);
		},
		destroy() {
			resizing.disconnect();
			cancelAnimationFrame(raf);
			app.canvas.removeEventListener('wheel', onWheel);
			app.destroy(true, { children: true });
			for (const f of faces.values()) f.destroy();
			faces.clear();
			blank.destroy();
		}
	};
	return scene;
}
