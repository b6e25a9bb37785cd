const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Checked before an id reaches a uuid column, where any other text is a database error rather than "not found". */
export const isUuid = (value: string): boolean => UUID.test(value);
