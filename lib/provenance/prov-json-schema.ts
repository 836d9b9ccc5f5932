// A JSON Schema (2020-12) for PROV-JSON documents, written by us from the W3C member submission
// "PROV-JSON Serialization" (T. D. Huynh, M. O. Jewell, A. Sezavar Keshavarz, D. T. Michaelides,
// H. Yang, L. Moreau; W3C Member Submission, 24 April 2013). It covers the parts Ergodex emits:
// prefixes, the three element kinds, and the relations of PROV-DM with their named arguments.

/** Where the schema's rules come from (cited by the tests). */
export const PROV_JSON_SOURCE = "W3C Member Submission 'PROV-JSON Serialization' (Huynh et al., 24 April 2013)";

// §2.3 of the submission: an identifier is a qualified name "prefix:local" (or a blank "_:x").
const qname = { type: "string", pattern: "^(_|[A-Za-z_][A-Za-z0-9_.-]*):[^\\s]*$" };

// §2.4–2.5: an attribute value is a string, number or boolean, or a typed literal {"$", "type"},
// or a language-tagged string {"$", "lang"}; an attribute may carry several values as an array.
const literal = {
  oneOf: [
    { type: "string" }, { type: "number" }, { type: "boolean" },
    { type: "object", required: ["$", "type"], properties: { $: { type: "string" }, type: qname }, additionalProperties: false },
    { type: "object", required: ["$", "lang"], properties: { $: { type: "string" }, lang: { type: "string" } }, additionalProperties: false },
  ],
};
const attributeValue = { oneOf: [literal, { type: "array", minItems: 1, items: literal }] };
const dateTime = { type: "string", format: "date-time" };

// Attributes of an element: qualified names as keys; prov:* ones with fixed meaning are typed.
const elementAttributes = (extra: Record<string, unknown> = {}) => ({
  type: "object",
  propertyNames: qname,
  properties: { "prov:label": attributeValue, "prov:type": attributeValue, "prov:location": attributeValue, ...extra },
  additionalProperties: attributeValue,
});

const elementMap = (attrs: object) => ({ type: "object", propertyNames: qname, additionalProperties: attrs });

/** A relation: its named arguments (qualified names of elements), required ones first, plus free attributes. */
const relation = (required: string[], optional: string[], times: string[] = []) => {
  const properties: Record<string, unknown> = {};
  for (const k of [...required, ...optional]) properties[k] = qname;
  for (const t of times) properties[t] = dateTime;
  return elementMap({ type: "object", required, propertyNames: qname, properties, additionalProperties: attributeValue });
};

/** The PROV-JSON document schema (2020-12). */
export const provJsonSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/schemas/prov-json.json",
  title: "PROV-JSON document",
  description: `Written from ${PROV_JSON_SOURCE}.`,
  type: "object",
  properties: {
    // §2.2: the prefix map, prefix → namespace IRI ("default" names the default namespace).
    prefix: { type: "object", additionalProperties: { type: "string", minLength: 1 } },
    entity: elementMap(elementAttributes()),
    activity: elementMap(elementAttributes({ "prov:startTime": dateTime, "prov:endTime": dateTime })),
    agent: elementMap(elementAttributes()),
    // §3.2: one member per relation kind, each a map from the relation's identifier to its arguments.
    wasGeneratedBy: relation(["prov:entity"], ["prov:activity"], ["prov:time"]),
    used: relation(["prov:activity"], ["prov:entity"], ["prov:time"]),
    wasInformedBy: relation(["prov:informed"], ["prov:informant"]),
    wasStartedBy: relation(["prov:activity"], ["prov:trigger", "prov:starter"], ["prov:time"]),
    wasEndedBy: relation(["prov:activity"], ["prov:trigger", "prov:ender"], ["prov:time"]),
    wasInvalidatedBy: relation(["prov:entity"], ["prov:activity"], ["prov:time"]),
    wasDerivedFrom: relation(["prov:generatedEntity", "prov:usedEntity"], ["prov:activity", "prov:generation", "prov:usage"]),
    wasAttributedTo: relation(["prov:entity", "prov:agent"], []),
    wasAssociatedWith: relation(["prov:activity"], ["prov:agent", "prov:plan"]),
    actedOnBehalfOf: relation(["prov:delegate", "prov:responsible"], ["prov:activity"]),
    wasInfluencedBy: relation(["prov:influencee", "prov:influencer"], []),
    specializationOf: relation(["prov:specificEntity", "prov:generalEntity"], []),
    alternateOf: relation(["prov:alternate1", "prov:alternate2"], []),
    hadMember: relation(["prov:collection", "prov:entity"], []),
    bundle: { type: "object", propertyNames: qname, additionalProperties: { $ref: "#" } },
  },
  additionalProperties: false,
} as const;
