// The package ships no types: it measures the optimal string alignment distance (Levenshtein
// with adjacent transpositions counted as one edit).
declare module 'damerau-levenshtein' {
  export default function damerauLevenshtein(a: string, b: string, limit?: number): { steps: number; relative: number; similarity: number };
}
