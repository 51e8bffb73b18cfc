/**
 * The font files the exports embed, found by path so the PDF and the PNG set the same
 * glyphs whatever the machine's font configuration says.
 *
 * First choice: Liberation Sans (Debian `fonts-liberation`), metric-compatible with Arial,
 * which is what the drawings' label widths are estimated for (engine/render/page.ts).
 * Second: DejaVu Sans (`fonts-dejavu-core`), wider by about a tenth, so long labels may
 * crowd. Neither: the PDF names the standard PDF font Helvetica without embedding it
 * (same widths as Arial; characters outside Latin-1 such as Δ are lost) and the PNG uses
 * whatever the system has. The service logs which it uses when it starts.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';

export interface FontFiles {
  /** Family name inside the files ("Liberation Sans"). */
  family: string;
  regular: string;
  bold: string | null;
  italic: string | null;
  boldItalic: string | null;
}

interface Candidate {
  family: string;
  /** Debian's package that installs it. */
  debianPackage: string;
  dirs: string[];
  files: { regular: string; bold: string; italic: string; boldItalic: string };
}

/** Where Debian/Ubuntu (first) and Fedora put the files. */
const CANDIDATES: Candidate[] = [
  {
    family: 'Liberation Sans',
    debianPackage: 'fonts-liberation',
    dirs: ['/usr/share/fonts/truetype/liberation', '/usr/share/fonts/truetype/liberation2', '/usr/share/fonts/liberation-sans', '/usr/share/fonts/liberation'],
    files: { regular: 'LiberationSans-Regular.ttf', bold: 'LiberationSans-Bold.ttf', italic: 'LiberationSans-Italic.ttf', boldItalic: 'LiberationSans-BoldItalic.ttf' },
  },
  {
    family: 'DejaVu Sans',
    debianPackage: 'fonts-dejavu-core',
    dirs: ['/usr/share/fonts/truetype/dejavu', '/usr/share/fonts/dejavu-sans-fonts', '/usr/share/fonts/dejavu'],
    files: { regular: 'DejaVuSans.ttf', bold: 'DejaVuSans-Bold.ttf', italic: 'DejaVuSans-Oblique.ttf', boldItalic: 'DejaVuSans-BoldOblique.ttf' },
  },
];

/** The first family whose regular face exists in one of its folders, or null. `dirs` replaces the built-in folders (tests). */
export function findExportFonts(dirs?: string[]): FontFiles | null {
  for (const candidate of CANDIDATES) {
    for (const dir of dirs ?? candidate.dirs) {
      const path = (name: string): string | null => (existsSync(join(dir, name)) ? join(dir, name) : null);
      const regular = path(candidate.files.regular);
      if (regular === null) continue;
      return {
        family: candidate.family,
        regular,
        bold: path(candidate.files.bold),
        italic: path(candidate.files.italic),
        boldItalic: path(candidate.files.boldItalic),
      };
    }
  }
  return null;
}

/** One sentence for the service log: which fonts the exports use, and what to install if not the first choice. */
export function describeExportFonts(fonts: FontFiles | null): string {
  const preferred = CANDIDATES[0];
  if (fonts?.family === preferred.family) return `PDF and PNG exports embed ${fonts.family} from ${fonts.regular}.`;
  const install = `install Debian's ${preferred.debianPackage} for ${preferred.family}, metric-compatible with Arial`;
  if (fonts !== null) return `PDF and PNG exports use ${fonts.family} (${fonts.regular}); labels may run wider than drawn for: ${install}.`;
  return `No font file for PDF and PNG exports was found: the PDF names Helvetica without embedding it (Δ and other non-Latin-1 characters are lost) and the PNG uses the system's fonts; ${install}.`;
}
