// Package tokenize turns Unicode text into normalized word tokens (UAX #29
// segmentation, normalization, case folding, accent, number and length
// rules) and optionally stems them.
//
// # Steps
//
// Tokenizer.Each takes a text through these steps, in this order:
//
//  1. Repair: each byte that is not part of valid UTF-8 becomes U+FFFD and
//     each NUL byte becomes a space; both are counted in Stats.
//  2. Normalization of the whole text: NFKC (default), NFC or none, with
//     golang.org/x/text/unicode/norm (Unicode 15.0 with Go 1.26).
//  3. Segmentation into words by the UAX #29 word boundary rules, with
//     github.com/blevesearch/segment, whose tables are from Unicode 8.0.
//     Segments typed as letters, numbers, ideographs or kana are kept;
//     spaces, punctuation, symbols and emoji are dropped. Two corrections
//     apply (see testdata/uax29/README.md): a run of letters of a script
//     written without spaces (Thai, Lao, Khmer, Myanmar), which UAX #29
//     splits into single characters, is kept as one token; and letters and
//     digits added to Unicode after 8.0 are kept instead of dropped.
//  4. Case, per token. CaseFold (default) is full Unicode case folding
//     without language tailoring, the folding of Unicode's default caseless
//     matching (CaseFolding.txt statuses C and F): "ß" and "ẞ" fold to "ss",
//     the ligature "ﬁ" to "fi", Turkish dotted "İ" to "i" followed by U+0307
//     COMBINING DOT ABOVE, "I" to "i", and dotless "ı" stays "ı". CaseLower
//     is the full lowercase mapping: "ß" stays, "İ" also becomes "i" +
//     U+0307, and a final capital sigma becomes "ς". If a mapping leaves the
//     token outside the chosen normal form, the token is normalized again.
//  5. Accents, per token, only under AccentsStrip: decompose (NFD), remove
//     nonspacing marks (Mn), compose again (NFKC under nfkc, else NFC), so
//     "İ" ends as "i" and "é" as "e". Letters without a decomposition, such
//     as "ø" and "ß", stay. Scripts that write vowels as nonspacing marks
//     (Thai, Devanagari) lose them too: strip accents only for text in
//     scripts whose marks are accents.
//  6. Apostrophes: U+2019 RIGHT SINGLE QUOTATION MARK inside a token becomes
//     the ASCII apostrophe, so "don’t" and "don't" are one token. (UAX #29
//     joins letters across both, WB6 and WB7; NFKC maps the fullwidth
//     apostrophe to ASCII already.)
//  7. Numbers: a token the segmenter types as a number ("42", "3.14",
//     "1,000") is kept, replaced by NumberMask, or dropped.
//  8. Length: tokens shorter than MinLen or longer than MaxLen characters
//     are dropped; NumberMask is exempt.
//
// Tokenizer.AppendNormalized applies steps 1, 2 and 4 to 6 to a single word,
// so word lists can be compared with tokens.
//
// # Stemming
//
// A Stemmer applies the Snowball stemmers of github.com/kljensen/snowball to
// tokens, stop words included, and caches recent stems.
package tokenize
