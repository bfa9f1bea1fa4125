/**
 * Plot export on the main thread (needs the DOM). The PDF report does not use these: it draws the plots as
 * vectors with jsPDF from the same plain plot data (pdfPlots.ts), so it also runs in Node.
 */

/** Standalone SVG text of a rendered plot: namespaces added, computed size written as width/height. */
export function svgToString(svg: SVGSVGElement): string {
  const clone = svg.cloneNode(true) as SVGSVGElement;
  clone.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
  clone.setAttribute('xmlns:xlink', 'http://www.w3.org/1999/xlink');
  const { width, height } = svgSize(svg);
  clone.setAttribute('width', String(width));
  clone.setAttribute('height', String(height));
  if (!clone.getAttribute('viewBox')) clone.setAttribute('viewBox', `0 0 ${width} ${height}`);
  return '<?xml version="1.0" encoding="UTF-8"?>\n' + new XMLSerializer().serializeToString(clone);
}

function svgSize(svg: SVGSVGElement): { width: number; height: number } {
  const box = svg.getBoundingClientRect();
  const vb = svg.viewBox?.baseVal;
  const width = box.width || (vb && vb.width) || Number(svg.getAttribute('width')) || 600;
  const height = box.height || (vb && vb.height) || Number(svg.getAttribute('height')) || 400;
  return { width, height };
}

/**
 * PNG of a rendered plot at `scale` × its CSS size (2 gives a sharp image for slides), on a white background.
 * Rejects with an Error when the browser cannot rasterise the SVG.
 */
export async function svgToPngBlob(svg: SVGSVGElement, scale = 2): Promise<Blob> {
  if (!(scale > 0 && scale <= 8)) throw new RangeError(`scale must be in (0, 8], got ${scale}`);
  const { width, height } = svgSize(svg);
  const url = URL.createObjectURL(new Blob([svgToString(svg)], { type: 'image/svg+xml;charset=utf-8' }));
  try {
    const img = new Image();
    img.decoding = 'async';
    img.src = url;
    await img.decode();
    const canvas = document.createElement('canvas');
    canvas.width = Math.round(width * scale);
    canvas.height = Math.round(height * scale);
    const ctx = canvas.getContext('2d');
    if (!ctx) throw new Error('This browser cannot draw on a canvas, so the plot cannot be saved as PNG.');
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, canvas.width, canvas.height);
    ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
    return await new Promise<Blob>((resolve, reject) =>
      canvas.toBlob(
        (b) => (b ? resolve(b) : reject(new Error('The plot could not be converted to PNG.'))),
        'image/png',
      ),
    );
  } finally {
    URL.revokeObjectURL(url);
  }
}
