import { saveFile } from './download';

/**
 * Saves an on-screen SVG picture as an SVG file or a PNG (at twice its size, for sharp text). The
 * text colour the picture inherits from the page is written into the copy, so a saved file looks the
 * same wherever it is opened.
 */
export async function savePicture(svg: SVGSVGElement, name: string, format: 'svg' | 'png'): Promise<void> {
  const copy = svg.cloneNode(true) as SVGSVGElement;
  copy.setAttribute('color', getComputedStyle(svg).color);
  copy.setAttribute('style', `background: ${getComputedStyle(document.body).backgroundColor}`);
  const text = new XMLSerializer().serializeToString(copy);
  const svgBlob = new Blob([text], { type: 'image/svg+xml' });
  if (format === 'svg') return saveFile(svgBlob, `${name}.svg`);
  const box = svg.viewBox.baseVal;
  const scale = 2;
  const img = new Image();
  const url = URL.createObjectURL(svgBlob);
  try {
    img.src = url;
    await img.decode();
    const canvas = document.createElement('canvas');
    canvas.width = box.width * scale;
    canvas.height = box.height * scale;
    const ctx = canvas.getContext('2d')!;
    ctx.fillStyle = getComputedStyle(document.body).backgroundColor;
    ctx.fillRect(0, 0, canvas.width, canvas.height);
    ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
    const png = await new Promise<Blob>((ok, fail) => canvas.toBlob((b) => (b ? ok(b) : fail(new Error('no PNG'))), 'image/png'));
    saveFile(png, `${name}.png`);
  } finally {
    URL.revokeObjectURL(url);
  }
}
