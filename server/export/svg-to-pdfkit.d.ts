// svg-to-pdfkit ships no type declarations; only the call pdf-document.ts makes is declared.
declare module 'svg-to-pdfkit' {
  interface SvgToPdfOptions {
    width?: number;
    height?: number;
    /** true: SVG px are PDF pt; false (default): 1 px = 0.75 pt (CSS 96 px to the inch). */
    assumePt?: boolean;
    fontCallback?: (family: string, bold: boolean, italic: boolean, fontOptions: { fauxBold?: boolean; fauxItalic?: boolean }) => string;
    warningCallback?: (warning: string) => void;
  }
  export default function SVGtoPDF(doc: PDFKit.PDFDocument, svg: string, x: number, y: number, options?: SvgToPdfOptions): void;
}
