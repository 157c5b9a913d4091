// What the web bundle gets for zod's JSON Schema conversion (to and from): nothing. The app only
// checks answers against its schemas and never turns one into a JSON Schema, and the converters
// were a sixth of zod's share of the first screen. Schemas still ask for the two method makers
// when built (the `~standard` getter), so those exist and fail only if someone calls what they make.
const unavailable = (): never => {
  throw new Error('JSON Schema conversion is not part of the web bundle.');
};
export const createToJSONSchemaMethod = () => unavailable;
export const createStandardJSONSchemaMethod = () => unavailable;
export const toJSONSchema = unavailable;
export const fromJSONSchema = unavailable;
export class JSONSchemaGenerator {
  constructor() {
    unavailable();
  }
}
