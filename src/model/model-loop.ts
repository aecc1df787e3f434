/**
 * The simulated loop of one visit's model, to overlay on the estimated
 * pressure–volume diagram (`assess --model-loop`, `report --model-loop`):
 * the steady beat of the model fitted to the visit (scenario.ts runScenario,
 * no change), labelled as a model loop and carrying the model's cautions; or,
 * when no model can be fitted, no points and the reason. Pure.
 */
import type { Assessment } from '../assessment/assess.js';
import type { ModelLoopOverlay } from '../render/pv-diagram.js';
import { DEFAULT_ELASTANCE_SHAPE } from './double-hill.js';
import { SCENARIO_CAUTIONS, runScenario } from './scenario.js';

/** The cautions of a model loop: what it is, and the model's limits as for every projection. */
export const MODEL_LOOP_CAUTIONS: readonly string[] = [
  'Model loop: the steady beat of a time-varying elastance ventricle and three-element Windkessel fitted to this visit under stated assumptions (docs/model.md); a simulation, not a measured loop and not a prediction.',
  'Reflexes, drugs that act on several parameters at once and valve disease are not modelled.',
  ...SCENARIO_CAUTIONS.slice(2),
];

export function modelLoopOverlay(a: Assessment): ModelLoopOverlay {
  const s = runScenario(a, {}, DEFAULT_ELASTANCE_SHAPE);
  const loop = s.loops?.baseline ?? [];
  if (!s.fit.ok || !s.fit.residuals || loop.length < 2) {
    const why = (s.fit.reason ?? s.projectionReason ?? 'the fitted model gave no steady beat').replace(/\.$/, '');
    return { points: [], label: 'Model loop', notes: [`No model loop: ${why}.`, ...MODEL_LOOP_CAUTIONS.slice(1)] };
  }
  const worst = Math.max(...Object.values(s.fit.residuals).map(Math.abs));
  const fitNote = `Model loop fitted to EDV, stroke volume, SBP and DBP, largest residual ${(100 * worst).toFixed(1)} % (tolerance ${(100 * s.fit.tolerance).toFixed(0)} %); ${s.fit.shapeLabel}.`;
  return { points: loop, label: 'Model loop (simulated by the model fitted to this visit)', notes: [fitNote, ...s.notes, ...MODEL_LOOP_CAUTIONS] };
}
