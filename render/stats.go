package render

import "sort"

// Stats counts what happened to each star of the catalogue. Every star is
// in exactly one of Drawn, Culled, OffFrame and Invalid.
type Stats struct {
	Total    int // stars in the catalogue
	Drawn    int // deposited (at least partly on the image)
	Culled   int // observed V′ fainter than Options.Limit, or left unread as too faint to reach it in view (RenderChunks)
	OffFrame int // bright enough but outside the image (or behind a pinhole)
	Invalid  int // non-finite observed brightness or position
	// Brightest lists the brightest drawn stars by observed V′, brightest
	// first, ties broken by catalogue row.
	Brightest []StarInfo
}

// StarInfo describes one drawn star as the observer sees it.
type StarInfo struct {
	Row  int    `json:"row"` // catalogue row index
	ID   int64  `json:"id"`  // catalogue identifier
	Name string `json:"name,omitempty"`
	// RA and Dec of the apparent (aberrated) direction n′, degrees, ICRS
	// axes in the ship frame.
	RA  float64 `json:"ra_deg"`
	Dec float64 `json:"dec_deg"`
	V   float64 `json:"v_mag"`   // observed V′
	D   float64 `json:"doppler"` // Doppler factor
	T   float64 `json:"t_k"`     // observed temperature T′ = D·T, K
	X   float64 `json:"x_px"`    // continuous pixel coordinates
	Y   float64 `json:"y_px"`
}

// insertBest keeps list sorted by (V, Row) and at most n long.
func insertBest(list []StarInfo, s StarInfo, n int) []StarInfo {
	i := sort.Search(len(list), func(j int) bool { return lessInfo(&s, &list[j]) })
	if len(list) < n {
		list = append(list, StarInfo{})
	}
	copy(list[i+1:], list[i:len(list)-1])
	list[i] = s
	return list
}

func lessInfo(a, b *StarInfo) bool {
	if a.V != b.V {
		return a.V < b.V
	}
	return a.Row < b.Row
}

func sortInfos(s []StarInfo) {
	sort.Slice(s, func(i, j int) bool { return lessInfo(&s[i], &s[j]) })
}
