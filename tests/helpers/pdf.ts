import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

/** A PDF's text as poppler's pdftotext lays it out (`-layout`); `flat` turns every run of white space into one space. */
export function pdfText(pdf: Buffer, { flat = false }: { flat?: boolean } = {}): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cw-pdf-'));
  try {
    const file = path.join(dir, 'document.pdf');
    fs.writeFileSync(file, pdf);
    const text = execFileSync('/usr/bin/pdftotext', ['-layout', file, '-'], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
    return flat ? text.replace(/\s+/g, ' ') : text;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
