/**
 * A user-defined absorber family from a design file. The JSON Schema
 * (schema/design.schema.json, `$defs/family`) has already checked every
 * field's type, unit range and spelling; what remains here are the relations
 * a schema cannot state: ordered pairs, and a gap model that stays above 0 eV
 * and reaches the stated window.
 */
import { UserError } from '../errors.js';
import { makeFamily, modelReach, type AbsorberFamily, type GapModel } from './alloy.js';

/** A family entry as written in a design file (snake_case, schema-valid). */
export interface UserFamilyEntry {
  id: string;
  name: string;
  variable: string;
  ea_ev?: number;
  eb_ev?: number;
  bowing_ev?: number;
  /** Instead of the bowing fields: the gap [eV] as a polynomial formula in x. */
  gap_formula?: string;
  window_ev: [number, number];
  window_reason?: string;
  range?: [number, number];
  dEg_dT_ev_per_k: number;
  refractive_index: number;
  source: string;
}

const eV = (v: number) => v.toFixed(2);

/**
 * The family of a schema-valid entry: bowing form E_g(x) = (1 − x)·ea_ev + x·eb_ev − bowing_ev·x(1 − x) [eV],
 * or the polynomial of its gap_formula, whose ascending coefficients [eV] the caller parsed (materials/formula.ts).
 * @param where location for messages, e.g. "materials[0]"
 * @throws UserError naming the field when a pair is reversed, the gap falls to 0 eV or the window misses the model
 */
export function familyFromEntry(e: UserFamilyEntry, where: string, formulaCoefficientsEv?: readonly number[]): AbsorberFamily {
  const fail = (field: string, message: string): never => {
    throw new UserError(`${where}: field "${field}" ${message}`);
  };
  const [wlo, whi] = e.window_ev;
  if (!(wlo < whi)) fail('window_ev', `must have lo < hi, got [${wlo}, ${whi}]`);
  const range: [number, number] = e.range ? [e.range[0], e.range[1]] : [0, 1];
  if (!(range[0] < range[1])) fail('range', `must have lo < hi, got [${range[0]}, ${range[1]}]`);
  if (e.gap_formula !== undefined && formulaCoefficientsEv === undefined) throw new Error(`${where}: gap_formula must be parsed before familyFromEntry`);
  const model: GapModel =
    e.gap_formula !== undefined
      ? { form: 'polynomial', coefficientsEv: [...(formulaCoefficientsEv as number[])] }
      : { form: 'bowing', eaEv: e.ea_ev as number, ebEv: e.eb_ev as number, bowingEv: e.bowing_ev as number };
  const reach = modelReach(model, range);
  if (!(reach.minEv > 0)) fail(e.gap_formula !== undefined ? 'gap_formula' : 'bowing_ev', `makes the gap fall to ${reach.minEv.toFixed(3)} eV at x=${reach.xAtMin.toFixed(2)}; a gap must stay above 0 eV`);
  if (whi < reach.minEv || wlo > reach.maxEv) {
    fail('window_ev', `[${wlo}, ${whi}] eV does not overlap the gaps the model reaches over range [${range[0]}, ${range[1]}] (${eV(reach.minEv)}–${eV(reach.maxEv)} eV)`);
  }
  const userSource = `user-supplied: ${e.source}`;
  return makeFamily({
    id: e.id,
    name: e.name,
    kind: 'alloy',
    variable: { symbol: 'x', meaning: e.variable },
    model,
    compositionRange: range,
    window: { gapEv: [wlo, whi], reason: e.window_reason ?? `user-defined window (${e.source})` },
    dEgDtEvPerK: e.dEg_dT_ev_per_k,
    refractiveIndex: e.refractive_index,
    citation: e.source,
    sources: { gap_model: e.gap_formula !== undefined ? `E_g(x) = ${e.gap_formula} eV (${userSource})` : userSource, window: userSource, dEg_dT: userSource, refractive_index: userSource },
  });
}
