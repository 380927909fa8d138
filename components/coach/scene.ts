import { DEFAULT_SWEEP_DIAMETER_MM } from '@/lib/leveling';
import type { UnitSystem } from '@/lib/leveling/units';
import type { SessionState } from '@/lib/session/fold';
import type { SceneMove } from '@/components/viewer/tilt-view';

/** What the tilt view draws besides the shape: the moves of the stage, where the level lay last, the sweep circle. */
export function sceneOf(state: SessionState, unitSystem: UnitSystem) {
  const byScrew = new Map<string, SceneMove>();
  for (const m of state.moves) if (m.status === 'done' && m.stage === state.stage) byScrew.set(m.screwId, { screwId: m.screwId, turns: m.doneTurns ?? m.turns, status: 'done' });
  for (const m of state.moves) if (m.status === 'pending') byScrew.set(m.screwId, { screwId: m.screwId, turns: m.turns, status: 'pending' });
  const moves = [...byScrew.values()];
  const lastLevel = state.readings.findLast((r) => r.kind === 'level');
  const lastSweep = state.readings.findLast((r) => r.kind === 'sweep');
  const sweepDiameterMm = lastSweep?.kind === 'sweep' ? lastSweep.diameterMm : DEFAULT_SWEEP_DIAMETER_MM;
  const showSweep = state.stage === 'spindle-sweep' || lastSweep !== undefined;
  const sweepLabel = `sweep circle ⌀${unitSystem === 'inch' ? `${(sweepDiameterMm / 25.4).toFixed(1)} in` : `${Math.round(sweepDiameterMm)} mm`}`;
  const level = lastLevel?.kind === 'level' ? { axis: lastLevel.axis, positionMm: lastLevel.positionMm } : null;
  const sweep = showSweep ? { diameterMm: sweepDiameterMm, label: sweepLabel } : null;
  // Equal scenes have equal keys: views memoise the tilt view on it.
  const key = JSON.stringify([moves, level, sweep]);
  return { moves, level, sweep, key };
}

