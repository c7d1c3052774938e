/**
 * How a CSV's text is read (methods.md §1): its encoding, field delimiter and decimal mark. A module
 * of its own, free of Node streams, so forms and option schemas can offer the same choices.
 */

/** The text encodings a dataset may be read in; UTF-8 is the default. */
export const TEXT_ENCODINGS = ["utf-8", "windows-1252", "utf-16"] as const;
export type TextEncodingName = (typeof TEXT_ENCODINGS)[number];

/** The field delimiters a CSV may use. */
export const DELIMITERS = [",", ";", "\t"] as const;
export type Delimiter = (typeof DELIMITERS)[number];

export const DECIMAL_MARKS = [".", ","] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];

/** How a CSV's text was read: chosen by the user or detected, and stated in the report. */
export interface CsvFormat {
  encoding: TextEncodingName;
  delimiter: Delimiter;
  decimalMark: DecimalMark;
}

/** The user's choices; a missing delimiter or decimal mark is detected. */
export type CsvFormatChoice = Partial<CsvFormat>;
