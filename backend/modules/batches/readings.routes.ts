import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import type { Deps } from '../../lib/deps.ts';
import { CSV_TYPE, csvTable, xlsxFile, XLSX_TYPE, type Table } from '../../lib/tabular-export.ts';
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

type Row = readonly string[];
const cell = (i: number) => (r: Row) => r[i] ?? '';
/** The template: example rows as typed in the CSV; in XLSX the times are date cells and the figures numbers. */
const template: Table<Row> = {
  name: 'Readings',
  columns: [
    { header: templateHeaders[0]!, value: cell(0), type: 'datetime', width: 20 },
    { header: templateHeaders[1]!, value: cell(1), type: 'number', width: 10 },
    { header: templateHeaders[2]!, value: cell(2), width: 8 },
    { header: templateHeaders[3]!, value: cell(3), type: 'number', width: 16 },
    { header: templateHeaders[4]!, value: cell(4), width: 30 },
  ],
  rows: exampleRows,
};
const help: Table<Row> = {
  name: 'How to fill in',
  columns: [
    { header: instructions[0]![0]!, value: cell(0), width: 18 },
    { header: '', value: cell(1), width: 110 },
  ],
  rows: instructions.slice(1),
  frozenHeader: false,
};

export function readingsRoutes(_deps: Deps): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/template.csv', (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('import', 'Reading');
    res.type(CSV_TYPE).attachment('readings-template.csv').send(csvTable(template));
  });

  router.get('/template.xlsx', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('import', 'Reading');
    res
      .type(XLSX_TYPE)
      .attachment('readings-template.xlsx')
      .send(await xlsxFile([template, help]));
  });

  return router;
}
