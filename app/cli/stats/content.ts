import { bounded } from '../../api/format.ts';
import { methodsField } from '../../engine/methods/index.ts';
import {
  analyzeContentValidity,
  contentValidityMethods,
  CVR_ALPHA,
  type ContentValidityReport,
  type ExpertRating,
} from '../../engine/content.ts';
import { columnLabel, parseTable, TableError } from '../../import/parse-table.ts';
import {
  DEFAULT_SCALE_MAX,
  DEFAULT_SCALE_MIN,
  describeProblem,
  type RatingsFile,
  readRatings,
} from '../../import/ratings/index.ts';
import { readUserFile } from '../files.ts';
import { formatTable } from '../table.ts';
import { DataError, type OptionValues, type StatsAnalysis, UsageError } from '../types.ts';
import { integerOption } from './data.ts';

/** Widest relevance scale accepted on the command line (a rating scale, not a measurement range). */
const SCALE_LIMIT = 1000;

/** Common stats options that do not apply to an expert panel; naming them is a usage error, not a silent no-op. */
const NOT_FOR_CONTENT: Record<string, string> = {
  data: 'give the expert ratings with --ratings FILE',
  min: 'give the relevance scale with --scale-min and --scale-max',
  max: 'give the relevance scale with --scale-min and --scale-max',
  reverse: 'relevance ratings are not reverse-keyed',
  missing: 'a blank rating is left out of its item; there is no missing-data method to choose',
  'missing-codes': 'leave a rating blank to mark it missing',
  seed: 'content validity has no random step',
};

function stringOption(values: OptionValues, name: string): string | undefined {
  const value = values[name];
  if (value === undefined || value === false) return undefined;
  if (value === true) throw new UsageError(`--${name} needs a value`);
  return value;
}

function firstProblem(file: string, problems: RatingsFile['problems'], header: readonly string[]): DataError {
  const more =
    problems.length > 1 ? ` (and ${problems.length - 1} more problem${problems.length > 2 ? 's' : ''})` : '';
  return new DataError(`${file}: ${describeProblem(problems[0], header)}${more}`);
}

/** Reads --item-facets FILE: columns item and facet, one row per item. */
function readIntendedFacets(file: string, bytes: Uint8Array): Record<string, string> {
  let table: ReturnType<typeof parseTable>;
  try {
    table = parseTable(bytes, { fileName: file });
  } catch (error) {
    if (error instanceof TableError) throw new DataError(`${file}: ${error.message}`);
    throw error;
  }
  const folded = table.header.map((h) => h.toLowerCase());
  const itemAt = folded.indexOf('item');
  const facetAt = folded.indexOf('facet');
  if (itemAt < 0 || facetAt < 0) {
    throw new DataError(
      `${file}: row 1: the item-facet file needs columns item and facet; found ${table.header.join(', ')}`,
    );
  }
  const out: Record<string, string> = {};
  table.rows.forEach((cells, i) => {
    const row = table.rowNumbers?.[i] ?? i + 2;
    const item = cells[itemAt].trim();
    const facet = cells[facetAt].trim();
    if (item === '')
      throw new DataError(
        `${file}: row ${row}, ${columnLabel(itemAt, table.header)}: the item code is blank`,
      );
    if (facet === '') {
      throw new DataError(
        `${file}: row ${row}, ${columnLabel(facetAt, table.header)}: item '${item}' has no facet`,
      );
    }
    if (Object.hasOwn(out, item)) {
      throw new DataError(
        `${file}: row ${row}, ${columnLabel(itemAt, table.header)}: item '${item}' is listed twice`,
      );
    }
    out[item] = facet;
  });
  return out;
}

function ratio(value: number | null, digits = 2): string {
  return bounded(value, digits);
}

function renderTable(file: string, report: ContentValidityReport): string {
  const { scale } = report;
  const relevantFrom = Math.floor((scale.min + scale.max) / 2) + 1;
  const hasFacets = report.items.some((it) => it.facet !== null);
  const hasCvr = report.items.some((it) => it.cvr !== null);
  const header = [
    'item',
    ...(hasFacets ? ['facet'] : []),
    'rated',
    'I-CVI',
    'k*',
    'band',
    ...(hasCvr ? ['CVR'] : []),
    'V',
  ];
  if (hasFacets) header.push('placed');
  const rows = report.items.map((it) => [
    it.item,
    ...(hasFacets ? [it.facet ?? '–'] : []),
    `${it.rated}/${report.experts.length}`,
    ratio(it.iCvi),
    ratio(it.modifiedKappa),
    it.kappaBand ?? '–',
    ...(hasCvr ? [ratio(it.cvr)] : []),
    ratio(it.aikenV),
    ...(hasFacets ? [ratio(it.facetAgreement)] : []),
  ]);
  const align = header.map(
    (h) => (h === 'item' || h === 'facet' || h === 'band' ? 'left' : 'right') as 'left' | 'right',
  );
  const lines = [
    `Content validity: ${file}`,
    `${report.experts.length} experts, ${report.items.length} items, relevance ${scale.min}–${scale.max} (relevant = ${relevantFrom}–${scale.max})`,
    '',
    formatTable(header, rows, align),
    '',
    `S-CVI/Ave ${bounded(report.sCviAve, 2)}   S-CVI/UA ${bounded(report.sCviUa, 2)}`,
  ];
  if (hasCvr || report.cvrCritical !== null) {
    lines.push(
      `critical CVR for ${report.experts.length} experts (exact binomial, one-tailed ${bounded(CVR_ALPHA, 2)}): ${ratio(report.cvrCritical, 3)}`,
    );
  }
  if (report.facets.length > 0) {
    lines.push(
      '',
      formatTable(
        ['facet', 'items', 'S-CVI/Ave', 'S-CVI/UA'],
        report.facets.map((f) => [f.facet, String(f.items), bounded(f.sCviAve, 2), bounded(f.sCviUa, 2)]),
        ['left', 'right', 'right', 'right'],
      ),
    );
  }
  if (report.facetSorting) {
    const s = report.facetSorting;
    const cohen = s.cohenKappa === null ? '' : `, Cohen's kappa ${bounded(s.cohenKappa, 2)}`;
    lines.push(
      '',
      `facet sorting: Fleiss' kappa ${ratio(s.fleissKappa)} over ${s.itemsUsed} items, ${s.raters} experts${cohen}`,
    );
  }
  const flagged = report.items.filter((it) => it.flags.length > 0);
  if (flagged.length > 0 || report.flags.length > 0) {
    lines.push('', 'benchmarks not met (they advise; the researcher decides):');
    for (const it of flagged) for (const f of it.flags) lines.push(`  ${it.item}: ${f}`);
    for (const f of report.flags) lines.push(`  scale: ${f}`);
  }
  lines.push('', 'k* = modified kappa (Polit, Beck & Owen 2007); V = Aiken (1985); CVR = Lawshe (1975)');
  return lines.join('\n');
}

/** `stats content`: content validity from an expert ratings file (methods as in the registry's content area). */
export const content: StatsAnalysis = {
  name: 'content',
  summary: "content validity from expert ratings: I-CVI, S-CVI, modified kappa, CVR, Aiken's V",
  options: {
    ratings: {
      type: 'string',
      value: 'FILE',
      required: true,
      description:
        'expert ratings, long (item,expert,relevance[,essential][,facet][,comment]) or wide (one column per expert)',
    },
    'scale-min': {
      type: 'string',
      value: 'N',
      description: `lowest point of the relevance scale (default ${DEFAULT_SCALE_MIN})`,
    },
    'scale-max': {
      type: 'string',
      value: 'N',
      description: `highest point of the relevance scale (default ${DEFAULT_SCALE_MAX}); the upper half counts as relevant`,
    },
    items: {
      type: 'string',
      value: 'a,b,c',
      description: 'the items the panel rated; a rating of any other item is a problem',
    },
    'item-facets': {
      type: 'string',
      value: 'FILE',
      description: 'intended facet of each item (columns item,facet), for facet agreement',
    },
    json: { type: 'boolean', description: 'print one JSON object at full precision instead of the table' },
  },
  refused: NOT_FOR_CONTENT,
  async run(values, ctx) {
    const file = stringOption(values, 'ratings');
    if (file === undefined) {
      throw new UsageError(
        '--ratings FILE is required (columns item,expert,relevance[,essential][,facet][,comment])',
      );
    }
    const min = integerOption(values, 'scale-min', -SCALE_LIMIT, SCALE_LIMIT) ?? DEFAULT_SCALE_MIN;
    const max = integerOption(values, 'scale-max', -SCALE_LIMIT, SCALE_LIMIT) ?? DEFAULT_SCALE_MAX;
    if (min >= max) throw new UsageError(`--scale-min must be below --scale-max (got ${min} and ${max})`);
    const itemsRaw = stringOption(values, 'items');
    let known: string[] | undefined;
    if (itemsRaw !== undefined) {
      known = itemsRaw.split(',').map((s) => s.trim());
      if (known.some((s) => s === '')) throw new UsageError(`--items "${itemsRaw}" has an empty name`);
    }
    const facetsFile = stringOption(values, 'item-facets');
    let intendedFacets: Record<string, string> | undefined;
    if (facetsFile !== undefined) {
      intendedFacets = readIntendedFacets(facetsFile, await readUserFile(facetsFile, 'item-facet file', ctx));
      known ??= Object.keys(intendedFacets);
    }

    const bytes = await readUserFile(file, 'ratings file', ctx);
    let parsed: RatingsFile;
    try {
      parsed = readRatings(bytes, { fileName: file, scaleMin: min, scaleMax: max, items: known });
    } catch (error) {
      if (error instanceof TableError) throw new DataError(error.message);
      throw error;
    }
    if (parsed.problems.length > 0) throw firstProblem(file, parsed.problems, parsed.header);

    const ratings: ExpertRating[] = parsed.ratings.map((r) => ({
      item: r.item,
      expert: r.expert,
      relevance: r.relevance,
      essential: r.essential,
      facet: r.facet,
    }));
    const report = analyzeContentValidity({
      ratings,
      scale: { min, max },
      hasEssential: parsed.hasEssential,
      intendedFacets,
    });
    const warnings = [...parsed.warnings.map((w) => `${file}: ${w}`), ...report.warnings];
    if (parsed.hasFacet && !intendedFacets) {
      warnings.push(
        'facet placements given without --item-facets: agreement with the intended facet not computed',
      );
    }
    const json: Record<string, unknown> = {
      analysis: 'content',
      ratings: file,
      layout: parsed.layout,
      scale: report.scale,
      experts: report.experts.length,
      expertCodes: report.experts,
      items: report.items,
      sCviAve: report.sCviAve,
      sCviUa: report.sCviUa,
      cvrCritical: report.cvrCritical,
      cvrAlpha: CVR_ALPHA,
      facets: report.facets,
      facetSorting: report.facetSorting,
      flags: report.flags,
      methods: methodsField(contentValidityMethods(report)),
    };
    return { json, table: renderTable(file, report), warnings };
  },
};
