/** Sending a CSV download, and the units an export is written in. */
import type { Request, Response } from 'express';
import type { CsvFile } from '../../shared/exports/csv';
import type { UnitSystem } from '../../shared/units';
import { clubOf } from '../middleware/authorize';
import { unitsFor } from '../services/account';

/** The units of an export: the query's, else the member's own. */
export async function exportUnits(req: Request, asked: UnitSystem | undefined): Promise<UnitSystem> {
  return asked ?? unitsFor((req.user as Express.User).id, clubOf(req).id);
}

export function sendCsv(res: Response, file: CsvFile): void {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${file.filename}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.send(file.csv);
}

