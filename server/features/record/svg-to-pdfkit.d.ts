// svg-to-pdfkit ships no types: the one function it exports, as its README documents it.
declare module 'svg-to-pdfkit' {
  function SVGtoPDF(
    doc: PDFKit.PDFDocument,
    svg: string,
    x?: number,
    y?: number,
    options?: { width?: number; height?: number; preserveAspectRatio?: string; fontCallback?: (family: string, bold: boolean, italic: boolean) => string; assumePt?: boolean },
  ): void;
  export default SVGtoPDF;
}
