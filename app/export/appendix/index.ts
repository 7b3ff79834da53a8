import path from 'node:path';
import type { Study } from '../../../db/study.ts';
import { type AppendixOptions, buildAppendix } from './build.ts';
import { renderDocx } from './docx.ts';
import { renderHtml } from './html.ts';
import { renderMarkdown } from './markdown.ts';
import { renderPdf } from './pdf.ts';

export const APPENDIX_FORMATS = ['md', 'html', 'docx', 'pdf'] as const;
export type AppendixFormat = (typeof APPENDIX_FORMATS)[number];

export const MEDIA_TYPES: Record<AppendixFormat, string> = {
  md: 'text/markdown; charset=utf-8',
  html: 'text/html; charset=utf-8',
  docx: 'application/vnd.openxmlformats-officedocument.wordprocessingml.document',
  pdf: 'application/pdf',
};

export interface RenderedAppendix {
  format: AppendixFormat;
  fileName: string;
  mediaType: string;
  bytes: Uint8Array;
  /** The log head the appendix records, and whether the file verified at export. */
  head: string | null;
  intact: boolean;
}

/**
 * The methods appendix of an open study in one format. Every format renders the same document
 * model, built once here from the study file alone; the study is only read.
 */
export async function exportAppendix(
  study: Study,
  format: AppendixFormat,
  options: AppendixOptions = {},
): Promise<RenderedAppendix> {
  const doc = buildAppendix(study, options);
  const head = study.log.head() ?? null;
  const stem = path.basename(study.path, path.extname(study.path));
  let bytes: Uint8Array;
  if (format === 'md') bytes = new TextEncoder().encode(renderMarkdown(doc));
  else if (format === 'html') bytes = new TextEncoder().encode(renderHtml(doc));
  else if (format === 'docx') bytes = await renderDocx(doc);
  else bytes = await renderPdf(doc);
  const verification = doc.blocks.some((b) => b.kind === 'notice' && b.tone === 'break');
  return {
    format,
    fileName: `${stem}-methods-appendix.${format}`,
    mediaType: MEDIA_TYPES[format],
    bytes,
    head,
    intact: !verification,
  };
}

export { buildAppendix } from './build.ts';
export type { AppendixDocument } from './model.ts';
