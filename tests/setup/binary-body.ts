import type request from 'supertest';

/** Reads a supertest response body as a Buffer (PDFs, CSV and FHIR JSON files come back as bytes). */
export function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}
