/**
 * Reading our SVGs back with a general-purpose XML parser (@xmldom/xmldom),
 * and undoing the drawing's scale from its own tick labels, so geometry is
 * checked against the numbers without reusing the renderer's scale code.
 */
import { DOMParser, type Document, type Element } from '@xmldom/xmldom';

/** Parse SVG text as XML; any warning or error fails. */
export function parseSvg(text: string): Document {
  const problems: string[] = [];
  const doc = new DOMParser({ onError: (level, msg) => problems.push(`${level}: ${msg}`) }).parseFromString(text, 'image/svg+xml');
  if (problems.length) throw new Error(`SVG is not well-formed XML:\n${problems.join('\n')}`);
  const root = doc.documentElement;
  if (!root || root.localName !== 'svg' || root.namespaceURI !== 'http://www.w3.org/2000/svg') throw new Error('root element is not an SVG <svg>');
  return doc;
}

export function elements(root: Document | Element, tag: string): Element[] {
  return Array.from(root.getElementsByTagName(tag)) as Element[];
}

export function num(el: Element, attr: string): number {
  const v = el.getAttribute(attr);
  if (v === null) throw new Error(`<${el.tagName}> has no ${attr}`);
  const n = Number(v);
  if (!Number.isFinite(n)) throw new Error(`<${el.tagName}> ${attr}="${v}" is not a number`);
  return n;
}

export interface LinearScale {
  /** Pixel → data. */
  invert(pixel: number): number;
}

/**
 * The scale of one axis from its tick marks: each `<g class="tick" data-axis=…>`
 * holds a grid line at the tick's pixel position and a text label with its value.
 * Fitted from the first and last tick, then every tick is checked against the fit.
 */
export function axisScale(doc: Document, axis: string, coordinate: 'x' | 'y'): LinearScale {
  const ticks = elements(doc, 'g').filter((g) => g.getAttribute('class') === 'tick' && g.getAttribute('data-axis') === axis);
  if (ticks.length < 2) throw new Error(`axis ${axis} has fewer than two ticks`);
  const pairs = ticks.map((g) => {
    const line = elements(g, 'line')[0]!;
    const text = elements(g, 'text')[0]!;
    return { pixel: num(line, coordinate === 'x' ? 'x1' : 'y1'), value: Number(text.textContent) };
  });
  const a = pairs[0]!;
  const b = pairs[pairs.length - 1]!;
  const slope = (b.value - a.value) / (b.pixel - a.pixel);
  const invert = (pixel: number) => a.value + (pixel - a.pixel) * slope;
  for (const p of pairs) if (Math.abs(invert(p.pixel) - p.value) > 1e-6 * Math.max(1, Math.abs(p.value)) + Math.abs(slope) * 0.011) throw new Error(`tick ${p.value} off the linear scale`);
  return { invert };
}

export function points(el: Element): [number, number][] {
  return (el.getAttribute('points') ?? '')
    .trim()
    .split(/\s+/)
    .map((pair) => pair.split(',').map(Number) as [number, number]);
}

/** Elements with a data-series attribute inside the group of one visit. */
export function series(doc: Document, visit: number, name: string): Element[] {
  const group = elements(doc, 'g').find((g) => g.getAttribute('class') === 'visit' && g.getAttribute('data-visit') === String(visit));
  if (!group) return [];
  return ['line', 'polyline', 'polygon'].flatMap((t) => elements(group, t)).filter((e) => e.getAttribute('data-series') === name);
}

/** All visible text of a document. */
export function allText(doc: Document): string {
  return elements(doc, 'text').map((t) => t.textContent ?? '').join('\n');
}
