import QRCode from 'qrcode';

/**
 * The label's QR code as SVG markup (error correction M, ISO/IEC 18004 level M: about 15 % of the
 * code can be damaged or covered and still read — common practice for printed labels).
 */
export function qrSvg(url: string): Promise<string> {
  return QRCode.toString(url, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 });
}

/** The same code as a PNG data URL (for saving the image on its own). */
export function qrDataUrl(url: string): Promise<string> {
  return QRCode.toDataURL(url, { errorCorrectionLevel: 'M', margin: 2, scale: 8 });
}
