/**
 * The review's export and print from the client (issue #10 §5): the export's query checked with
 * the server's own schema (shared/schemas/review-export.ts) so a field's message shows before
 * asking, the download through the one API client (store/api.ts: the sign-in's token, a refresh
 * on 401) handed to the browser as a Blob link, and the weekly sheet's query.
 */
import { queryOptions } from '@tanstack/react-query';
import { Platform } from 'react-native';

import { exportQuerySchema, weeklySheetSchema, type ExportKind } from '../shared/schemas/review-export';
import { dayOf } from '../shared/weeks';
import { apiRequestParsed, apiRequestText } from './api';

/** The default range: the last four weeks, today included, in the team's zone. */
export const DEFAULT_EXPORT_DAYS = 28;

export function defaultExportRange(timeZone: string, now: number = Date.now()): { from: string; to: string } {
  const to = dayOf(now, timeZone);
  // Whole calendar days back from the team's today (UTC arithmetic on a calendar day).
  const from = new Date(Date.parse(`${to}T00:00:00Z`) - (DEFAULT_EXPORT_DAYS - 1) * 86_400_000).toISOString().slice(0, 10);
  return { from, to };
}

export interface ExportAsk {
  kind: ExportKind;
  from: string;
  to: string;
  /** null: every skater. */
  skaterIds: readonly string[] | null;
}

/** The export's query string as the server reads it. */
export function exportSearch(ask: ExportAsk): Record<string, string> {
  const query: Record<string, string> = { kind: ask.kind, from: ask.from.trim(), to: ask.to.trim() };
  if (ask.skaterIds) query.skaterIds = ask.skaterIds.join(',');
  return query;
}

export const exportPath = (teamId: string, ask: ExportAsk) =>
  `/api/teams/${encodeURIComponent(teamId)}/review/export.csv?${new URLSearchParams(exportSearch(ask)).toString()}`;

/** What is wrong with an export's fields, per field (from, to, skaterIds, kind), in the server's words. */
export function exportProblems(ask: ExportAsk): Record<string, string> {
  if (ask.skaterIds && ask.skaterIds.length === 0) return { skaterIds: 'Pick at least one skater (or every skater).' };
  const parsed = exportQuerySchema.safeParse(exportSearch(ask));
  if (parsed.success) return {};
  const problems: Record<string, string> = {};
  for (const issue of parsed.error.issues) {
    const field = String(issue.path[0] ?? 'from');
    problems[field] ??= issue.message;
  }
  return problems;
}

/** The file name the server gives (Content-Disposition), else the same pattern made here. */
export function fileNameOf(headers: Pick<Headers, 'get'>, ask: ExportAsk): string {
  const match = /filename="([^"]+)"/.exec(headers.get('Content-Disposition') ?? '');
  return match?.[1] ?? `boardside-${ask.kind}-${ask.from}-${ask.to}.csv`;
}

/**
 * Records in a CSV text, the header row left out: record ends outside quotes (RFC 4180, a quote
 * inside a quoted cell is doubled, so the quote state flips back and forth and stays right).
 */
export function countCsvRecords(text: string): number {
  let records = 0;
  let quoted = false;
  let content = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') quoted = !quoted;
    if (!quoted && (ch === '\n' || (ch === '\r' && text[i + 1] !== '\n'))) {
      if (content) records++;
      content = false;
    } else if (!quoted && ch === '\r') {
      // The \r of \r\n: the \n ends the record.
    } else {
      content = true;
    }
  }
  if (content) records++;
  return Math.max(0, records - 1);
}

/** "812 B", "14.2 kB", "3.4 MB". */
export function sizeText(bytes: number): string {
  if (bytes < 1000) return `${bytes} B`;
  if (bytes < 1_000_000) return `${(bytes / 1000).toFixed(1)} kB`;
  return `${(bytes / 1_000_000).toFixed(1)} MB`;
}

export interface Downloaded {
  fileName: string;
  rows: number;
  bytes: number;
}

/** Hands a Blob to the browser as a download (web only: the phone apps have no file to save). */
export function saveBlob(blob: Blob, fileName: string): void {
  if (Platform.OS !== 'web' || typeof document === 'undefined') return;
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.rel = 'noopener';
  link.style.display = 'none';
  document.body.appendChild(link);
  link.click();
  link.remove();
  // Give the browser a moment to start reading the Blob before letting it go.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** Asks the server for the CSV, saves it, and says how many rows and bytes it held. */
export async function downloadExport(teamId: string, ask: ExportAsk, save: (blob: Blob, fileName: string) => void = saveBlob): Promise<Downloaded> {
  const { text, headers } = await apiRequestText(exportPath(teamId, ask));
  const fileName = fileNameOf(headers, ask);
  const blob = new Blob([text], { type: 'text/csv;charset=utf-8' });
  const rows = countCsvRecords(text);
  save(blob, fileName);
  return { fileName, rows, bytes: blob.size };
}

export const sheetKeys = {
  sheet: (teamId: string, skaterId: string, week: string) => ['review', teamId, 'sheet', skaterId, week] as const,
};

/** One skater's week to print. */
export function weeklySheetQuery(teamId: string, skaterId: string, week: string) {
  return queryOptions({
    queryKey: sheetKeys.sheet(teamId, skaterId, week),
    queryFn: ({ signal }) =>
      apiRequestParsed(
        `/api/teams/${encodeURIComponent(teamId)}/review/skaters/${encodeURIComponent(skaterId)}/sheet?week=${encodeURIComponent(week)}`,
        weeklySheetSchema,
        { signal },
      ),
  });
}
