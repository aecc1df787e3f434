import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { renderPvSketch } from '../../src/render/terminal-plot.js';

const HT: RawInputs = { sbp: 150, dbp: 92, hr: 68, edv: 118, esv: 46, ef: 61, pep: 95, et: 285, edp: 14 };
const loopOf = (raw: RawInputs) => assess(parseInputs(raw)).mechanics!.loop;

/** Undo the drawing: the volume scale from the ┬ marks and their labels, the pressure scale from the ┤ rows. */
function readSketch(lines: string[]) {
  const axisRow = lines.findIndex((l) => l.includes('└'));
  const axis = lines[axisRow]!;
  const labels = lines[axisRow + 1]!;
  const xTicks = [...axis].flatMap((ch, i) => (ch === '┬' ? [i] : []));
  const xValues = xTicks.map((i) => {
    const m = /\d+(\.\d+)?/.exec(labels.slice(Math.max(0, i - 3), i + 4));
    return Number(m![0]);
  });
  const yTicks = lines.slice(0, axisRow).flatMap((l, r) => (l.includes('┤') ? [{ r, value: Number(l.slice(0, l.indexOf('┤')).trim()) }] : []));
  const col = (i: number) => xValues[0]! + ((i - xTicks[0]!) * (xValues.at(-1)! - xValues[0]!)) / (xTicks.at(-1)! - xTicks[0]!);
  const row = (r: number) => yTicks[0]!.value + ((r - yTicks[0]!.r) * (yTicks.at(-1)!.value - yTicks[0]!.value)) / (yTicks.at(-1)!.r - yTicks[0]!.r);
  const find = (glyph: string) => {
    for (let r = 0; r < axisRow; r++) {
      const i = lines[r]!.indexOf(glyph, lines[r]!.search(/[│┤]/) + 1);
      if (i >= 0) return { volume: col(i), pressure: row(r) };
    }
    return null;
  };
  return { find, cellVolume: Math.abs(col(1) - col(0)), cellPressure: Math.abs(row(1) - row(0)), axisRow };
}

describe('compact text drawing of the pressure–volume diagram', () => {
  it('places end-systole at (ESV, Pes) and end-diastole at (EDV, EDP), within one character cell', () => {
    const lines = renderPvSketch([{ label: 'visit 1', loop: loopOf(HT) }]);
    const s = readSketch(lines);
    const es = s.find('S')!;
    expect(Math.abs(es.volume - 46)).toBeLessThanOrEqual(s.cellVolume);
    expect(Math.abs(es.pressure - 135)).toBeLessThanOrEqual(s.cellPressure);
    const ed = s.find('D')!;
    expect(Math.abs(ed.volume - 118)).toBeLessThanOrEqual(s.cellVolume);
    expect(Math.abs(ed.pressure - 14)).toBeLessThanOrEqual(s.cellPressure);
  });

  it('draws every piece with its own glyph, keeps to the width asked for and names the pieces', () => {
    const lines = renderPvSketch([{ label: 'visit 1', loop: loopOf(HT) }], { columns: 48, rows: 12 });
    const plot = lines.slice(0, readSketch(lines).axisRow).join('\n');
    for (const glyph of ['#', '/', '\\', '.']) expect(plot).toContain(glyph);
    for (const l of lines.slice(0, readSketch(lines).axisRow)) expect([...l].length).toBeLessThanOrEqual(48 + 6);
    expect(lines.join('\n')).toMatch(/end-systolic line/);
    expect(lines.join('\n')).toMatch(/not a measured loop/);
    expect(lines.join('\n')).not.toMatch(/NaN|Infinity|undefined/);
  });

  it('overlays a second visit with its own glyphs and says when the diastolic curve is missing', () => {
    const lines = renderPvSketch([
      { label: 'visit 2', loop: loopOf(HT) },
      { label: 'visit 1', loop: loopOf({ ...HT, edp: undefined, sbp: 130, dbp: 80 }) },
    ]);
    const text = lines.join('\n');
    expect(text).toMatch(/o loop visit 1/);
    expect(readSketch(lines).find('s')).not.toBeNull();
    expect(text).toMatch(/diastolic curve needs EDP/);
  });
});
