/**
 * Write the engagement summary of a folder: the DOCX and the XLSX from one model, through the
 * project's file writer. Returns the model and where the files went.
 */
import { writeFileAtomic } from '../workpaper/file.js';
import { loadFolder } from './folder.js';
import { folderStatus } from './status.js';
import { summaryModel, type SummaryModel } from './summary.js';
import { renderSummaryDocx } from './summary-docx.js';
import { renderSummaryXlsx } from './summary-xlsx.js';

export const SUMMARY_NAME = 'engagement-summary';

export interface WrittenSummary {
  model: SummaryModel;
  docx: string;
  xlsx: string;
}

export async function writeSummary(dir: string, o: { base: string; asOf: string; now: Date }): Promise<WrittenSummary> {
  const folder = loadFolder(dir);
  const model = summaryModel(folderStatus(dir, o.asOf), { ...(folder ? { folder } : {}), asOf: o.asOf, now: o.now });
  const [docx, xlsx] = await Promise.all([renderSummaryDocx(model), renderSummaryXlsx(model)]);
  const paths = { docx: `${o.base}.docx`, xlsx: `${o.base}.xlsx` };
  writeFileAtomic(paths.docx, docx, 'the summary (DOCX)');
  writeFileAtomic(paths.xlsx, xlsx, 'the summary (XLSX)');
  return { model, ...paths };
}
