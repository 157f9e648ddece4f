import { readFileSync } from 'node:fs';
import { test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { idealStack, independentWiring, seriesWiring } from '../../src/stack/model.js';
const ref = JSON.parse(readFileSync(new URL('../fixtures/reference/reference.json', import.meta.url), 'utf8'));
const s = am15g();
const rel = (a:number,b:number)=>Math.abs(a/b-1);
test('diag', () => {
  let m = {jsc:0,j0:0,voc:0,vmp:0,jmp:0,ff:0,eta:0};
  for (const r of ref.single) {
    const sp = idealStack([r.gap_ev], seriesWiring(1), { tempK: r.temp_k }); sp.subcells[0].ere = r.ere;
    const res = evaluateStack(sp, s); const c = res.subcells[0];
    m.jsc=Math.max(m.jsc,rel(c.jgenAm2/10,r.jsc_ma_cm2)); m.j0=Math.max(m.j0,rel(c.j0Am2/10,r.j0_ma_cm2));
    m.voc=Math.max(m.voc,Math.abs(c.vocV-r.voc_v)); m.vmp=Math.max(m.vmp,Math.abs(c.vmpV-r.vmp_v)); m.jmp=Math.max(m.jmp,rel(c.jmpAm2/10,r.jmp_ma_cm2));
    m.ff=Math.max(m.ff,Math.abs(c.ff-r.ff)); m.eta=Math.max(m.eta,Math.abs(res.efficiency-r.efficiency));
  }
  console.log('single', m);
  const w: Record<string, any> = {};
  for (const r of ref.stacks) {
    const n=r.gaps_ev.length;
    const wir = r.wiring==='series'?seriesWiring(n):r.wiring==='independent'?independentWiring(n):{kind:'voltage-matched',label:r.wiring,m:Number(r.wiring.split(':')[1]),n:Number(r.wiring.split(':')[2]),groups:[[0],[1]]};
    const cp = r.lc.model==='none'?{model:'none'}:r.lc.model==='empirical'?{model:'empirical',eta:[r.lc.eta]}:{model:'radiative',refractiveIndex:r.lc.n};
    const sp = idealStack(r.gaps_ev, wir as any, {coupling: cp as any}); sp.subcells[0].absorptance={kind:'step',value:r.top_absorptance};
    const res = evaluateStack(sp, s);
    const k = r.wiring+'/'+r.lc.model;
    const d = w[k] ?? (w[k]={eta:0,jgen:0,j0:0,jop:0,vop:0,jph:0,p:0});
    d.eta=Math.max(d.eta,Math.abs(res.efficiency-r.efficiency)); d.p=Math.max(d.p,rel(res.pmaxWm2,r.pmax_w_m2));
    for (let i=0;i<n;i++){const c=res.subcells[i];
      d.jgen=Math.max(d.jgen,rel(c.jgenAm2/10,r.jgen_ma_cm2[i])); d.j0=Math.max(d.j0,rel(c.j0Am2/10,r.j0_ma_cm2[i]));
      d.jop=Math.max(d.jop,rel(c.jOpAm2/10,r.j_op_ma_cm2[i])); d.vop=Math.max(d.vop,rel(c.vOpV,r.v_op_v[i])); d.jph=Math.max(d.jph,rel(c.jphAm2/10,r.jph_ma_cm2[i]));}
  }
  console.log(w);
  for (const r of ref.finite_absorptance) {
    const sp = idealStack([r.gap_ev], seriesWiring(1));
    sp.subcells[0].absorptance = {kind:'beer-lambert',passes:2,thicknessNm:r.thickness_nm,alpha:{kind:'direct',alpha0PerCm:r.alpha0_per_m/100,urbachEv:0}};
    const res = evaluateStack(sp, s); const c=res.subcells[0];
    console.log(r.thickness_nm, rel(c.jgenAm2/10,r.jsc_ma_cm2), rel(c.j0Am2/10,r.j0_ma_cm2), c.vocV-r.voc_v, res.efficiency-r.efficiency, c.j0Am2/10, r.j0_ma_cm2);
  }
});
