// fontkit (the font engine pdfkit embeds fonts with) ships no type declarations; only what
// halo-outlines.ts uses is declared here.
declare module 'fontkit' {
  export interface PathCommand {
    command: 'moveTo' | 'lineTo' | 'quadraticCurveTo' | 'bezierCurveTo' | 'closePath';
    args: number[];
  }
  export interface Glyph {
    path: { commands: PathCommand[] };
  }
  export interface GlyphPosition {
    xAdvance: number;
    yAdvance: number;
    xOffset: number;
    yOffset: number;
  }
  export interface Font {
    unitsPerEm: number;
    layout(text: string): { glyphs: Glyph[]; positions: GlyphPosition[] };
  }
  export function create(buffer: Buffer): Font;
}
