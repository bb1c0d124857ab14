// fontkit ships no type declarations; the report engine only opens a font and hands it to pdfkit.
declare module 'fontkit' {
  export interface Font {
    layout(text: string, features?: unknown): unknown;
  }
  export function create(buffer: Uint8Array, postscriptName?: string): Font;
}
