// Stands in for zod's JSON Schema modules (to-json-schema, json-schema-processors,
// json-schema-generator, from-json-schema) in the web bundle (see metro.config.js): the app
// validates with its schemas and never converts them to or from JSON Schema. Every name the
// rest of zod imports from those modules is here; calling one says why it is missing.
const missing = (name) =>
  function unavailable() {
    throw new Error(`zod's ${name} is left out of Sympodia's web bundle (see metro.config.js)`);
  };

export const initializeContext = missing('initializeContext');
export const handleUnrepresentable = missing('handleUnrepresentable');
export const processSchema = missing('processSchema');
export const process = processSchema;
export const extractDefs = missing('extractDefs');
export const finalize = missing('finalize');
// Called when a schema's `~standard` is first read; the method it returns is never called.
export const createToJSONSchemaMethod = () => missing('toJSONSchema');
export const createStandardJSONSchemaMethod = () => missing('~standard.jsonSchema');
export const toJSONSchema = missing('toJSONSchema');
export const fromJSONSchema = missing('fromJSONSchema');
export const allProcessors = {};
export class JSONSchemaGenerator {
  constructor() {
    missing('JSONSchemaGenerator')();
  }
}
