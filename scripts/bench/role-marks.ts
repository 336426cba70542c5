/**
 * The browser's cost of drawing sample-role marks (npm run bench:role-marks): N role badges shown and
 * hidden 20 times in Chromium, traced, three ways —
 *   tile      the app's drawing: one pattern tile (ROLE_STYLE) repeated over each box;
 *   per box   the drawing before it: an SVG the size of each box holding an SVG <pattern> of the same marks;
 *   plain     the role's fill colour alone, no pattern (the floor).
 * Prints, per showing, the renderer main thread's style, layout and paint (recording) time and the raster
 * workers' time, median of 3 interleaved rounds, and each against the floor.
 *
 * Run: npm run bench:role-marks [-- --marks 96,384 --rounds 3]
 */
import { ROLE_CODE, SAMPLE_ROLES } from '@equilight/contracts';
import { ROLE_STYLE } from '../../web/src/app/shared/role-code/role-style';
import { launchChromium } from '../../web/e2e/support/browser';
import { perBoxPatternSvg } from '../../web/e2e/support/role-pattern-reference';
import { median, option } from './bench-kit';
import { TRACE_CATEGORIES, type TraceEvent, onRendererMain } from './web-page-load';

const COUNTS = option('marks', '96,384').split(',').map(Number);
const ROUNDS = Number(option('rounds', '3'));
const SHOWINGS = 20;

const KINDS = {
  tile: (role: (typeof SAMPLE_ROLES)[number]) =>
    `background-image:${ROLE_STYLE[role].backgroundImage.replace(/"/g, "'")};background-size:${ROLE_STYLE[role].backgroundSize}`,
  'per box': (role: (typeof SAMPLE_ROLES)[number]) =>
    `background-image:url('data:image/svg+xml,${encodeURIComponent(perBoxPatternSvg(ROLE_CODE[role]))}');background-size:100% 100%`,
  plain: (role: (typeof SAMPLE_ROLES)[number]) => `background-color:${ROLE_CODE[role].fill}`,
} as const;
type Kind = keyof typeof KINDS;

async function main(): Promise<void> {
  const browser = await launchChromium();
  try {
    for (const count of COUNTS) {
      const figures = new Map<Kind, number[][]>();
      for (let round = 0; round < ROUNDS; round++)
        for (const kind of Object.keys(KINDS) as Kind[]) {
          const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
          let html = '<body style="margin:0"><div id="marks" style="display:none;flex-wrap:wrap;gap:3px">';
          for (let i = 0; i < count; i++) {
            const size = [16, 22, 26][i % 3];
            const role = SAMPLE_ROLES[i % SAMPLE_ROLES.length]!;
            html += `<span style="width:${size}px;height:${size}px;border-radius:50%;${KINDS[kind](role)}"></span>`;
          }
          await page.setContent(`${html}</div>`);
          await page.waitForTimeout(200);
          await browser.startTracing(page, { categories: TRACE_CATEGORIES });
          await page.evaluate(
            `new Promise((done) => { let n = 0; const marks = document.getElementById('marks');
              const step = () => { marks.style.display = n % 2 ? 'none' : 'flex';
                if (++n < ${SHOWINGS * 2}) requestAnimationFrame(step); else done(); };
              requestAnimationFrame(step); })`,
          );
          const events = (
            JSON.parse((await browser.stopTracing()).toString('utf8')) as { traceEvents: TraceEvent[] }
          ).traceEvents;
          const mainThread = onRendererMain(events);
          const cpu = (e: TraceEvent) => (e.tdur ?? e.dur ?? 0) / 1000;
          const onMain = (name: string) =>
            mainThread.filter((e) => e.name === name).reduce((sum, e) => sum + cpu(e), 0);
          const raster = events
            .filter((e) => e.ph === 'X' && e.name === 'RasterTask')
            .reduce((s, e) => s + cpu(e), 0);
          const row = [onMain('UpdateLayoutTree'), onMain('Layout'), onMain('Paint'), raster].map(
            (ms) => ms / SHOWINGS,
          );
          figures.set(kind, [...(figures.get(kind) ?? []), row]);
          await page.close();
        }
      const summary = new Map(
        [...figures].map(([kind, rows]) => [kind, [0, 1, 2, 3].map((j) => median(rows.map((r) => r[j]!)))]),
      );
      const floor = summary.get('plain')!;
      const total = (r: number[]) => r.reduce((a, b) => a + b, 0);
      console.log(
        `${count} role marks, ms per showing (median of ${ROUNDS} rounds of ${SHOWINGS} showings):`,
      );
      for (const [kind, r] of summary)
        console.log(
          `    ${kind.padEnd(8)} style ${r[0]!.toFixed(2)}  layout ${r[1]!.toFixed(2)}  paint ${r[2]!.toFixed(2)}  raster ${r[3]!.toFixed(2)}  total ${total(r).toFixed(2)} (${(total(r) / total(floor)).toFixed(1)}× the plain floor)`,
        );
      const [tile, perBox] = [total(summary.get('tile')!), total(summary.get('per box')!)];
      console.log(`    the tile costs ${(perBox / tile).toFixed(1)}× less than an SVG per box`);
    }
  } finally {
    await browser.close();
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
