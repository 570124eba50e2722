import { buildTarrowModel, trackMode, modeOutputShape } from './modal/simulator';
for (const mw of [0, 500, 1000, 1500, 2000, 2500, 2800, 3000, 3200, 3500, 4000]) {
  try {
  const m = buildTarrowModel(mw);
  const row = ['north-south','east-west','greyscar'].map(t => { const x = trackMode(m, t); return x ? `${t} ${x.frequencyHz.toFixed(3)}Hz ${x.dampingPercent.toFixed(2)}%` : `${t} -`; });
  const ang = m.outputs.filter(o=>o.kind==='angle').map(o=>`${o.channel}:${o.steady.toFixed(1)}`).join(' ');
  console.log(mw, row.join(' | '));
  if (mw===2000) { console.log(ang); const ns = trackMode(m,'north-south')!; console.log(JSON.stringify(ns.shape)); console.log(m.outputs.map(o=>o.channel).join(','))}
  } catch (e) { console.log(mw, (e as Error).message); }
}
