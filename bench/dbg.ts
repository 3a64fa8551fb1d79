import {
  judgeStage,
  pastDayOf,
  COMPLETE_DAY,
  CHECKPOINT_HOURS,
  type PastDay,
  type SectionCounts,
} from '@tierscope/domain';
import { RealisticHouse, SLOTS_PER_DAY } from '../simulator/src/realistic';
const stageEnds = [...CHECKPOINT_HOURS.map((h) => h * 4), SLOTS_PER_DAY];
const zs: number[][] = [[], [], []];
const raw: number[][] = [[], [], []];
for (let seed = 1; seed <= 12; seed++) {
  const house = new RealisticHouse({
    rows: 16,
    tiers: 3,
    seed,
    breed: seed % 2 ? 'white' : 'brown',
    beltRunHours: seed % 3 === 0 ? [1.5, 3, 4.5, 6, 8, 10, 13, 16] : undefined,
  });
  const past: PastDay[] = [];
  for (let d = 0; d < 60; d++) {
    const day = house.dayData(d);
    const sections: SectionCounts[] = day.sections.map((s) => {
      const byStage: number[] = [];
      let sum = 0,
        slot = 0;
      for (const end of stageEnds) {
        for (; slot < end; slot++) sum += s.counted[slot] ?? 0;
        byStage.push(sum);
      }
      return { row: s.row, tier: s.tier, byStage };
    });
    if (d >= 28)
      for (let stage = 0; stage <= COMPLETE_DAY; stage++) {
        const j = judgeStage({ thresholdPct: 10, stage, sections, past });
        for (const s of j.spots.values())
          if (s.scope === 'section') {
            zs[stage]!.push(s.z);
            raw[stage]!.push(Math.log(s.ratio));
          }
      }
    past.unshift(pastDayOf(`d${d}`, sections, new Set()));
  }
}
for (let st = 0; st < 3; st++) {
  const z = zs[st]!;
  const n = z.length;
  const sd = Math.sqrt(z.reduce((a, b) => a + b * b, 0) / n);
  const r = raw[st]!;
  const rsd = Math.sqrt(r.reduce((a, b) => a + b * b, 0) / n);
  console.log(
    'stage',
    st,
    'n',
    n,
    'sd(z)',
    sd.toFixed(3),
    'sd(log ratio)',
    rsd.toFixed(4),
    'P(z<-3)',
    (z.filter((v) => v < -3).length / n).toExponential(2),
    'P(z<-4)',
    (z.filter((v) => v < -4).length / n).toExponential(2),
    'P(z<-4.5)',
    (z.filter((v) => v < -4.5).length / n).toExponential(2),
    'P(r<-0.105)',
    (r.filter((v) => v < -0.105).length / n).toExponential(2),
  );
}
