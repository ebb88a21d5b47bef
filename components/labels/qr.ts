import { create } from 'qrcode';

/** Light modules around the code; the QR specification asks for four. */
export const QUIET_ZONE = 4;

export type QrShape = {
  /** Width and height in modules, quiet zone included. */
  size: number;
  /** One SVG path drawing every dark module as a 1 x 1 square. */
  path: string;
};

/** The modules of a QR code for `text` (error correction M: survives a scuffed label). */
export function qrShape(text: string): QrShape {
  const { modules } = create(text, { errorCorrectionLevel: 'M' });
  const parts: string[] = [];
  for (let row = 0; row < modules.size; row += 1) {
    for (let col = 0; col < modules.size; col += 1) {
      if (modules.get(row, col)) parts.push(`M${col + QUIET_ZONE} ${row + QUIET_ZONE}h1v1h-1z`);
    }
  }
  return { size: modules.size + QUIET_ZONE * 2, path: parts.join('') };
}

/** The same code as a standalone SVG document, for an <img> on the printed sheet. */
export function qrSvg(text: string, dark: string, light: string): string {
  const { size, path } = qrShape(text);
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${size} ${size}" shape-rendering="crispEdges"><rect width="${size}" height="${size}" fill="${light}"/><path d="${path}" fill="${dark}"/></svg>`;
}

export function svgDataUri(svg: string): string {
  return `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`;
}
