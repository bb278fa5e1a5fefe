// Package names gives stars the names people use: it reads the IAU Catalog
// of Star Names (IAU-CSN, published by the IAU Division C Working Group on
// Star Names, WGSN, under Creative Commons Attribution — credit the IAU WGSN
// wherever the names are shown), understands Bayer and Flamsteed
// designations in their common spellings, finds the star a user names in a
// catalogue (Index.Find), and writes the label text a viewer can read
// (Index.Label). It also invents names for the brightest stars of the
// built-in synthetic sky (Invent), so that demo frames are labelled too.
//
// Imports go one way: names uses catalog (rows, catalogue ids and the
// catalogue's own designations); catalog knows nothing of names.
//
// Conventions: a designation is a Bayer letter (one of the 24 Greek letters,
// with an optional superscript number: α¹ Cen) and/or a Flamsteed number,
// followed by one of the 88 IAU constellations (three-letter abbreviation or
// Latin genitive, as in the IAU Style Manual, Wilkins 1989, Table 11).
// Queries compare proper names ignoring case, blanks and punctuation other
// than letters and digits. Positions in the names table are ICRS degrees at
// epoch J2000.0; magnitudes Johnson V.
//
// Library code here never prints and never reads files other than those it
// is given.
package names
