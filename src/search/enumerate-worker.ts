/** Worker entry: one share of a step-objective enumeration (see pool.ts). */
import { enumerateStep, type EnumerationResult } from './enumerate.js';
import { StepObjective } from '../stack/step-objective.js';
import type { EnumerationTask } from './pool.js';

export default function enumerateShare(task: EnumerationTask): EnumerationResult {
  const obj = new StepObjective(task.objective);
  return enumerateStep(obj, { axis: task.axis, ranges: task.ranges, margin: task.margin, firstIndices: task.firstIndices, initialBest: task.initialBest });
}
