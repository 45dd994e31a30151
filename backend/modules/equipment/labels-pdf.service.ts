import QRCode from 'qrcode';
import type { Content, TDocumentDefinitions } from 'pdfmake/interfaces';
import { renderPdf } from '../../lib/pdf.ts';
import { pdfBase, type PdfCoop } from '../../lib/pdf-frame.ts';
import { equipmentKindLabels, type Equipment } from '../../../shared/schemas/equipment.ts';

/** The sheet: A4 portrait, 3 × 8 labels of 70 × 37 mm, edge to edge (a common adhesive label sheet). */
export const labelSheet = { columns: 3, rows: 8, labelWidthMm: 70, labelHeightMm: 37, pageWidthMm: 210, pageHeightMm: 297 } as const;
const mm = (v: number) => (v * 72) / 25.4;
const perPage = labelSheet.columns * labelSheet.rows;

const cautions: Partial<Record<Equipment['kind'], string>> = {
  keg: 'Pressure vessel: never exceed its rated pressure; keep the relief valve working.',
  co2_cylinder: "Chain upright. Never exceed a regulator's rated pressure. CO2 displaces air: ventilate.",
  tap: 'Cold room: CO2 displaces air. Ventilate; heed the CO2 alarm.',
};

function describe(item: Equipment): string {
  const a = item.attributes;
  const parts: string[] = [equipmentKindLabels[item.kind]];
  if (item.capacityLiters) parts.push(`${item.capacityLiters} L`);
  if (item.kind === 'keg' && typeof a.lock === 'string') parts.push(`${a.lock} lock`);
  if (item.kind === 'fermenter' && typeof a.style === 'string') parts.push(String(a.style));
  if (item.kind === 'co2_cylinder' && typeof a.sizeKg === 'number') parts.push(`${a.sizeKg} kg`);
  if (item.kind === 'co2_cylinder' && typeof a.hydroTestDue === 'string') parts.push(`test due ${a.hydroTestDue}`);
  return parts.join(' · ');
}

async function labelCell(item: Equipment, publicUrl: string, coopName: string): Promise<Content> {
  const url = `${publicUrl}/cellar/${item.id}`;
  // Vector QR (one SVG path): sharp at any print resolution, and far quicker than encoding a PNG.
  const qr = await QRCode.toString(url, { type: 'svg', errorCorrectionLevel: 'M', margin: 0, color: { dark: '#1c1917', light: '#ffffff' } });
  const pad = mm(3);
  const qrSize = mm(28);
  const textWidth = mm(labelSheet.labelWidthMm) - qrSize - 3 * pad;
  const caution = cautions[item.kind];
  return {
    margin: [pad, pad, pad, 0],
    columns: [
      { svg: qr, width: qrSize, height: qrSize },
      {
        width: textWidth,
        stack: [
          { text: item.code, fontSize: 22, color: '#1c1917', margin: [0, 0, 0, 1] },
          { text: item.name, fontSize: 8.5, color: '#1c1917', maxHeight: 24 } as Content,
          { text: describe(item), fontSize: 6.5, color: '#57534e', margin: [0, 2, 0, 0] },
          ...(caution ? [{ text: caution, fontSize: 5.5, color: '#991b1b', margin: [0, 2, 0, 0] } as Content] : []),
          { text: 'Scan to open in Cellarwright', fontSize: 5.5, color: '#78716c', margin: [0, 2, 0, 0] },
          { text: coopName, fontSize: 5.5, color: '#78716c', noWrap: true },
        ],
      },
    ],
    columnGap: pad,
  };
}

/**
 * A PDF of QR labels for the given items, in the order given: each label holds the code, the name, a QR of its
 * page and the co-op's name. The sheet is printed edge to edge, so it has the frame's font and document info
 * (lib/pdf-frame.ts) but no letterhead or footer.
 */
export async function renderLabelSheet(items: Equipment[], publicUrl: string, coop: PdfCoop): Promise<Buffer> {
  const cells = await Promise.all(items.map((item) => labelCell(item, publicUrl, coop.coopName)));
  const pages: Content[] = [];
  for (let p = 0; p * perPage < cells.length; p++) {
    const pageCells = cells.slice(p * perPage, (p + 1) * perPage);
    const body: Content[][] = [];
    for (let r = 0; r < labelSheet.rows && r * labelSheet.columns < pageCells.length; r++) {
      const row = pageCells.slice(r * labelSheet.columns, (r + 1) * labelSheet.columns);
      while (row.length < labelSheet.columns) row.push({ text: '' });
      body.push(row);
    }
    pages.push({
      ...(p > 0 ? { pageBreak: 'before' as const } : {}),
      table: {
        widths: Array(labelSheet.columns).fill(mm(labelSheet.labelWidthMm)),
        heights: mm(labelSheet.labelHeightMm),
        dontBreakRows: true,
        body,
      },
      layout: { hLineWidth: () => 0, vLineWidth: () => 0, paddingLeft: () => 0, paddingRight: () => 0, paddingTop: () => 0, paddingBottom: () => 0 },
    });
  }
  const topMargin = (mm(labelSheet.pageHeightMm) - mm(labelSheet.labelHeightMm) * labelSheet.rows) / 2;
  const base = pdfBase(coop, 'Equipment labels');
  const doc: TDocumentDefinitions = {
    ...base,
    pageOrientation: 'portrait',
    pageMargins: [0, topMargin, 0, 0],
    defaultStyle: { ...base.defaultStyle, fontSize: 8, lineHeight: 1.05 },
    content: pages,
  };
  return renderPdf(doc);
}
