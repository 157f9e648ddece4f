/**
 * Wiring as text, shared by the command line and design files:
 * series | independent | 3t | vm:M:N, and for any stack a partition into
 * series groups, `groups:1+2/3` (subcells 1-based from the top; `/` between
 * groups, `+` within one), or voltage-matched strings of two such groups,
 * `vm:M:N:1+2/3`.
 */
import { ParameterError, ref, says } from '../errors.js';
import { independentWiring, seriesWiring, type Wiring } from './model.js';

export const WIRING_FORMS = 'series (2t), independent (4t), 3t, vm:M:N, groups:1+2/3 or vm:M:N:1+2/3';

function parseGroups(text: string, n: number, what: string): number[][] {
  const groups = text.split('/').map((g) =>
    g.split('+').map((c) => {
      const i = Number(c.trim());
      if (!(Number.isInteger(i) && i >= 1 && i <= n)) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)}: "${c}" is not a subcell of a ${n}-subcell stack (1 = top)`);
      return i - 1;
    }),
  );
  const seen = new Set<number>();
  for (const g of groups) for (const i of g) {
    if (seen.has(i)) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)}: subcell ${i + 1} is in two groups`);
    seen.add(i);
  }
  if (seen.size !== n) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)}: every subcell must be in one group (${seen.size} of ${n} placed)`);
  return groups;
}

/** Parse a wiring for a stack of n subcells; `what` names the parameter in messages (a shell renames it to its option or field). */
export function parseWiring(value: string, n: number, what = 'wiring'): Wiring {
  const text = value.trim().toLowerCase();
  if (text === 'series' || text === '2t') return seriesWiring(n);
  if (text === 'independent' || text === '4t') return { ...independentWiring(n), label: 'independent' };
  if (text === '3t') {
    if (n !== 2) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)} 3t needs exactly 2 subcells (a shared middle contact); use groups:… for other stacks`);
    return { kind: 'groups', label: '3t', groups: [[0], [1]] };
  }
  const grouped = /^groups:(.+)$/.exec(text);
  if (grouped) return { kind: 'groups', label: text, groups: parseGroups(grouped[1], n, what) };
  const vm = /^vm:(\d+):(\d+)(?::(.+))?$/.exec(text);
  if (vm) {
    const m = Number(vm[1]);
    const k = Number(vm[2]);
    if (!(m >= 1 && k >= 1 && m <= 100 && k <= 100)) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)}: voltage-matched ratio must be whole numbers 1–100, got ${m}:${k}`);
    let groups: number[][];
    if (vm[3] !== undefined) groups = parseGroups(vm[3], n, what);
    else if (n === 2) groups = [[0], [1]];
    else throw new ParameterError(what, WIRING_FORMS, says`${ref(what)} vm:M:N on ${n} subcells needs its two groups, e.g. vm:${m}:${k}:1+2/3`);
    if (groups.length !== 2) throw new ParameterError(what, WIRING_FORMS, says`${ref(what)}: voltage-matched strings join exactly two groups, got ${groups.length}`);
    return { kind: 'voltage-matched', label: text, m, n: k, groups: [groups[0], groups[1]] };
  }
  throw new ParameterError(what, WIRING_FORMS, says`${ref(what)} must be ${WIRING_FORMS}, got "${value}"`);
}
