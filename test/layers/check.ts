/**
 * `npm run layers`: checks the imports of app/, db/ and renderer/ against the named rules of
 * `.dependency-cruiser.cjs`, and prints each break with its rule's reason. Exit 0 when none, 1 otherwise.
 *
 * Runs dependency-cruiser through its library interface: its command-line launcher refuses Node 20,
 * which this project supports, while the library itself runs on it.
 */
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { type IConfiguration, type ICruiseResult, cruise } from 'dependency-cruiser';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const require = createRequire(import.meta.url);

export interface LayerViolation {
  rule: string;
  from: string;
  to: string;
  /** For a cycle: the modules after `from`, back to it. */
  cycle: string[];
  /** The rule's reason, from its `comment`. */
  reason: string;
}

/** The project's rule file. */
export function loadRules(): IConfiguration {
  return require(path.join(ROOT, '.dependency-cruiser.cjs')) as IConfiguration;
}

/** Cruises `paths` (relative to `baseDir`, the project root by default) with the project's rules. */
export async function checkLayers(
  paths: string[],
  options: { baseDir?: string } = {},
): Promise<{ modules: number; violations: LayerViolation[] }> {
  const config = loadRules();
  const result = await cruise(paths, {
    ...config.options,
    baseDir: options.baseDir ?? ROOT,
    validate: true,
    ruleSet: { forbidden: config.forbidden },
    tsConfig: { fileName: path.join(ROOT, 'tsconfig.json') },
    outputType: 'json',
  });
  const output = (
    typeof result.output === 'string' ? JSON.parse(result.output) : result.output
  ) as ICruiseResult;
  const reasons = new Map((config.forbidden ?? []).map((rule) => [rule.name, rule.comment ?? '']));
  const violations = output.summary.violations.map((v) => ({
    rule: v.rule.name,
    from: v.from,
    to: v.to,
    cycle: (v.cycle ?? []).map((step) => step.name),
    reason: reasons.get(v.rule.name) ?? '',
  }));
  return { modules: output.summary.totalCruised, violations };
}

/** One block per rule: its reason once, then each import that breaks it. */
export function formatViolations(violations: LayerViolation[]): string {
  const byRule = new Map<string, LayerViolation[]>();
  for (const v of violations) byRule.set(v.rule, [...(byRule.get(v.rule) ?? []), v]);
  const lines: string[] = [];
  for (const [rule, list] of byRule) {
    lines.push(`${rule}: ${list[0].reason}`);
    for (const v of list) {
      lines.push(v.cycle.length > 0 ? `  ${[v.from, ...v.cycle].join(' → ')}` : `  ${v.from} → ${v.to}`);
    }
  }
  return lines.join('\n');
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const { modules, violations } = await checkLayers(['app', 'db', 'renderer']);
  if (violations.length === 0) {
    console.log(`layers: ${modules} modules, no import breaks a layer rule`);
  } else {
    console.error(formatViolations(violations));
    console.error(`layers: ${violations.length} imports break a layer rule (.dependency-cruiser.cjs)`);
    process.exitCode = 1;
  }
}
