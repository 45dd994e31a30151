import { ForbiddenError } from '@casl/ability';
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { Router } from 'express';
import type { Deps } from '../../lib/deps.ts';
import { csvCell, XLSX_DATE_TIME_FORMAT, xlsxCell } from '../../lib/export-cells.ts';
import { requireUser } from '../../middleware/authenticate.ts';

/** The template's columns: what the importer proposes a mapping for without being told. */
export const templateHeaders = ['Taken at', 'Gravity', 'Unit', 'Temperature °C', 'Note'];
const exampleRows = [
  ['2026-10-01 09:00', '1.052', 'SG', '20.0', 'Pitched yeast'],
  ['2026-10-03 09:00', '1.031', 'SG', '19.5', ''],
  ['2026-10-05 18:30', '6.2', '°P', '19.0', 'Hydrometer in °Plato'],
];

const instructions = [
  ['How to fill in the readings template'],
  [''],
  [
    'Taken at',
    'Date and time of the reading, e.g. 2026-10-03 14:05 (or a spreadsheet date). Times without an offset are read in the time zone you pick when importing.',
  ],
  ['Gravity', 'The number you read: specific gravity (1.048), degrees Plato (12.0) or Brix (12.5). A decimal comma (1,048) works too.'],
  ['Unit', 'SG, °P or °Bx for each row. Leave the column out and pick one unit for the whole file when importing.'],
  ['Temperature °C', 'Sample temperature, optional. Hydrometer readings (SG, °P) are corrected to the hydrometer’s calibration temperature.'],
  ['Note', 'Optional.'],
  [''],
  ['Replace the example rows with your own. Each row is one reading; two readings of one batch at the same time count as duplicates.'],
];

export function readingsRoutes(_deps: Deps): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/template.csv', (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('import', 'Reading');
    const csv = Papa.unparse(
      [templateHeaders, ...exampleRows].map((r) => r.map(csvCell)),
      { newline: '\r\n' },
    );
    res.type('text/csv; charset=utf-8').attachment('readings-template.csv').send(`\uFEFF${csv}\r\n`);
  });

  router.get('/template.xlsx', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('import', 'Reading');
    const wb = new ExcelJS.Workbook();
    wb.creator = 'Cellarwright';
    const ws = wb.addWorksheet('Readings', { views: [{ state: 'frozen', ySplit: 1 }] });
    ws.columns = [
      { header: templateHeaders[0], key: 'takenAt', width: 20, style: { numFmt: XLSX_DATE_TIME_FORMAT } },
      { header: templateHeaders[1], key: 'gravity', width: 10 },
      { header: templateHeaders[2], key: 'unit', width: 8 },
      { header: templateHeaders[3], key: 'temperature', width: 16 },
      { header: templateHeaders[4], key: 'note', width: 30 },
    ];
    ws.getRow(1).font = { bold: true };
    for (const [t, g, u, temp, note] of exampleRows) {
      // Spreadsheet dates hold wall-clock time; exceljs writes a Date's UTC fields.
      ws.addRow([new Date(`${t!.replace(' ', 'T')}:00Z`), Number(g), u, Number(temp), note].map(xlsxCell));
    }
    const help = wb.addWorksheet('How to fill in');
    help.getColumn(1).width = 18;
    help.getColumn(2).width = 110;
    for (const line of instructions) help.addRow(line.map(xlsxCell));
    help.getRow(1).font = { bold: true };
    res
      .type('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet')
      .attachment('readings-template.xlsx')
      .send(Buffer.from(await wb.xlsx.writeBuffer()));
  });

  return router;
}
