/** A person's name split the way citation formats want it. */
export interface NameParts {
  given?: string;
  particle?: string;
  family: string;
}

/**
 * Split "Given Names Family" into parts. audit.yaml keeps a name as one
 * string, so the split is a convention: the last word is the family name,
 * lower-case words just before it ("van der", "de", "von") are its particle,
 * the rest are given names. A name already written "Family, Given" is taken
 * as written (the BibTeX convention, Patashnik, BibTeXing, 1988, §4).
 */
export function splitName(name: string): NameParts {
  const trimmed = name.trim().replace(/\s+/g, " ");
  const comma = trimmed.indexOf(",");
  if (comma > 0) {
    const familyPart = trimmed.slice(0, comma).trim();
    const given = trimmed.slice(comma + 1).trim();
    const words = familyPart.split(" ");
    let i = 0;
    while (i < words.length - 1 && /^\p{Ll}/u.test(words[i])) i++;
    return { ...(given ? { given } : {}), ...(i > 0 ? { particle: words.slice(0, i).join(" ") } : {}), family: words.slice(i).join(" ") };
  }
  const words = trimmed.split(" ");
  if (words.length === 1) return { family: words[0] };
  const family = words[words.length - 1];
  let start = words.length - 1;
  while (start > 1 && /^\p{Ll}/u.test(words[start - 1])) start--;
  const particle = words.slice(start, words.length - 1).join(" ");
  const given = words.slice(0, start).join(" ");
  return { given, ...(particle ? { particle } : {}), family };
}

/** "Jean-Luc Anne" → "J.-L. A."; initials already written stay as they are. */
export function initials(given: string): string {
  return given
    .split(" ")
    .filter(Boolean)
    .map((w) =>
      w
        .split("-")
        .map((part) => (part.endsWith(".") ? part : `${[...part][0] ?? ""}.`))
        .join("-"),
    )
    .join(" ");
}
