import { createScenario } from '../../shared/sim/scenario.js';

const fmt = (n: number): string => Math.round(n).toLocaleString('en-US');

/** Times scan generation of one default site (60 m × 40 m, 3 robots, 4 scanners) for a few settings; prints scans/s, beams/s and the time for 28 days. */
export async function run(): Promise<void> {
  const settings = [
    { label: 'full beams (541), 240 scans/robot/day', scansPerRobotPerDay: 240, beamStep: 1 },
    { label: 'demo: 271 beams, 120 scans/robot/day', scansPerRobotPerDay: 120, beamStep: 2 },
  ];
  for (const s of settings) {
    const t0 = performance.now();
    const sc = createScenario({ seed: 1, days: 28, startDate: '2026-11-02', scansPerRobotPerDay: s.scansPerRobotPerDay, beamStep: s.beamStep, mountErrors: [{ robot: 'AMR-02', dyaw: 0.0244 }] });
    const t1 = performance.now();
    let scans = 0;
    let beams = 0;
    let returns = 0;
    // Generation only (the demo seed ingests records directly); JSON and gzip cost extra.
    for (let day = 0; day < 28; day++) {
      for (const rec of sc.scansForDay(day)) {
        scans++;
        beams += rec.ranges.length;
        for (const r of rec.ranges) if (r !== null) returns++;
      }
    }
    const seconds = (performance.now() - t1) / 1000;
    console.log(
      `${s.label}: setup ${fmt(t1 - t0)} ms; 28 days = ${fmt(scans)} scans, ${fmt(beams)} beams (${((100 * returns) / beams).toFixed(1)} % returns) ` +
        `in ${seconds.toFixed(2)} s → ${fmt(scans / seconds)} scans/s, ${fmt(beams / seconds)} beams/s`,
    );
  }

  // JSON-line encoding, as the simulate command writes it before gzip.
  const sc = createScenario({ seed: 2, days: 1, startDate: '2026-11-02' });
  const t2 = performance.now();
  let bytes = 0;
  let n = 0;
  for (const rec of sc.scansForDay(0)) {
    bytes += JSON.stringify(rec).length + 1;
    n++;
  }
  const sec = (performance.now() - t2) / 1000;
  console.log(`generate + JSON (541 beams): ${fmt(n / sec)} scans/s, ${fmt(bytes / n)} bytes/line before gzip`);
}
