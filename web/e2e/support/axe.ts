import type { Page } from 'playwright-core';

interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: string[] }[];
}

type AxeWindow = {
  axe?: { run: (context: unknown, options: unknown) => Promise<{ violations: AxeViolation[] }> };
};

/**
 * axe-core's serious and critical violations on the page (or inside `selector`), one line each with up to
 * five offending elements; `alsoRules` adds rules of lower impact that must pass too (e.g. `region`,
 * `heading-order`). The page's context needs `bypassCSP: true`: the app's content-security policy would
 * refuse the injected script.
 */
export async function axeSerious(
  page: Page,
  selector?: string,
  alsoRules: readonly string[] = [],
): Promise<string[]> {
  const loaded = await page.evaluate(() => Boolean((window as unknown as AxeWindow).axe));
  if (!loaded) await page.addScriptTag({ path: require.resolve('axe-core/axe.min.js') });
  const violations = await page.evaluate(async (sel) => {
    const axe = (window as unknown as AxeWindow).axe!;
    const result = await axe.run(sel ?? document, { resultTypes: ['violations'] });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => ({ target: n.target.map(String) })),
    }));
  }, selector ?? null);
  return violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical' || alsoRules.includes(v.id))
    .map(
      (v) =>
        `${v.impact} ${v.id}: ${v.help} (${v.nodes
          .map((n) => n.target.join(' '))
          .slice(0, 5)
          .join('; ')}${v.nodes.length > 5 ? `; … ${v.nodes.length} in all` : ''})`,
    );
}
