/** A member path in parsed JSON, e.g. ['coefficients', 2, 'estimate']. */
export type JsonPath = readonly (string | number)[];

type JsonNode = Record<string | number, unknown>;

/** The object or array that holds the last member of `path`. */
function holder(o: unknown, path: JsonPath): JsonNode {
  let at = o;
  for (const key of path.slice(0, -1)) at = (at as JsonNode)[key];
  return at as JsonNode;
}

const last = (path: JsonPath) => path[path.length - 1];

/** The member at `path` of parsed JSON. */
export const getAt = (o: unknown, path: JsonPath): unknown => holder(o, path)[last(path)];

/** Overwrites the member at `path`, to make a saved file wrong on purpose. */
export function setAt(o: unknown, path: JsonPath, value: unknown): void {
  holder(o, path)[last(path)] = value;
}

/** Removes the member at `path`. */
export function deleteAt(o: unknown, path: JsonPath): void {
  delete holder(o, path)[last(path)];
}
