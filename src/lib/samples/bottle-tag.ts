import QRCode from 'qrcode';

// The bottle tag's QR code opens the sample in Sumpwise. It is drawn on the server (no script on the
// print view) with error correction level M, which survives a smudge of oil on a small label.

/** The address a bottle tag's QR code opens. */
export function buildSampleUrl(publicUrl: string, sampleId: string): string {
  return new URL(`/samples/${encodeURIComponent(sampleId)}`, publicUrl).toString();
}

/** The QR code of a URL as an inline SVG string (scales to any label size). */
export function renderQrSvg(url: string): Promise<string> {
  return QRCode.toString(url, {
    type: 'svg',
    errorCorrectionLevel: 'M',
    margin: 1,
    color: { dark: '#000000', light: '#ffffff' },
  });
}

/** The QR code of a URL as a PNG (for checks and for clients that cannot draw SVG). */
export function renderQrPng(url: string, scale = 6): Promise<Buffer> {
  return QRCode.toBuffer(url, { type: 'png', errorCorrectionLevel: 'M', margin: 2, scale });
}

/** The address a tag printed before its sample existed opens (by bottle code; the crew's sample of that code). */
export function buildBottleCodeUrl(publicUrl: string, code: string): string {
  return new URL(`/samples/by-code/${encodeURIComponent(code)}`, publicUrl).toString();
}
