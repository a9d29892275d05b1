import { defineRule } from './rule';

// Fields: each value on its own, against the type, range and allowed values of the format.

export const FIELD = {
  required: defineRule('field', 'field_required', 'error', 'A required value is empty.'),
  notNumber: defineRule('field', 'field_not_number', 'error', 'A numeric column holds something that is not a number.'),
  outOfRange: defineRule('field', 'field_out_of_range', 'error', 'A number lies outside the range the format allows.'),
  notInteger: defineRule('field', 'field_not_integer', 'error', 'A class or code column holds something other than a whole number.'),
  notAllowed: defineRule('field', 'field_not_allowed', 'error', 'A value is not one of the words the column allows.'),
  badDate: defineRule('field', 'field_bad_date', 'error', 'A date is not a real calendar date written YYYY-MM-DD.'),
  dateInFuture: defineRule('field', 'field_date_in_future', 'error', 'A survey date lies in the future.'),
  dateTooEarly: defineRule('field', 'field_date_too_early', 'error', 'A survey date lies before 1800.'),
  tooLong: defineRule('field', 'field_too_long', 'error', 'A text value is longer than the column allows.'),
  badCharacters: defineRule('field', 'field_bad_characters', 'error', 'A key holds characters other than A-Z a-z 0-9 _ . -.'),
  unknownForestType: defineRule('field', 'field_unknown_forest_type', 'error', 'A forest type code is not in the configured list.'),
  reservedRegion: defineRule('field', 'field_reserved_region', 'error', 'A region is named "national", the name the exports give to all regions together.'),
  speciesNameForm: defineRule('field', 'field_species_name_form', 'error', 'An accepted name in species.csv is not written "Genus epithet".'),
  nulCharacter: defineRule('field', 'field_nul_character', 'error', 'A value holds a NUL character (byte 0x00), which no text column of the database can store.'),
} as const;

export const fieldMessages = {
  nulCharacter: (column: string | null) =>
    `${column ?? 'a header name'} holds a NUL character (byte 0x00), which cannot be stored; the file may be damaged or written by a program that pads with zero bytes — remove them and upload again`,
};
