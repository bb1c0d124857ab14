/** Associations between models, wired in one place after every model is initialised. */
export function associate(): void {
  // The foundation's models have no associations; cases, specimens and reports add theirs here.
}
