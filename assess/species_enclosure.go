package assess

import "slices"

// EnclosureClass is a size of pre-release flight enclosure, as listed in
// PRACTICE.md "Enclosures": the minimum cage sizes of Miller (ed.) 2012,
// Minimum Standards for Wildlife Rehabilitation, 4th ed. (NWRA & IWRC), as
// quoted in Duerr & Gage (eds.) 2020, Hand-Rearing Birds, 2nd ed. Two rows are
// recalled, not read, and say so in Provenance.
type EnclosureClass struct {
	ID         string     `json:"id"`       // this project's code, e.g. "owl-large"
	Label      string     `json:"label"`    // what the class is for, in the source's words
	LengthM    float64    `json:"length_m"` // m
	WidthM     float64    `json:"width_m"`  // m
	HeightM    float64    `json:"height_m"` // m
	Feet       string     `json:"feet"`     // the source's size in feet, L×W×H
	Note       string     `json:"note,omitempty"`
	Provenance Provenance `json:"provenance"`
	Citation   string     `json:"citation"`
}

const (
	citeMinStd       = "Miller, E.A. (ed.) 2012. Minimum Standards for Wildlife Rehabilitation, 4th ed. NWRA & IWRC, via Duerr, R.S. & Gage, L.J. (eds.) 2020. Hand-Rearing Birds, 2nd ed. Wiley"
	citeMinStdMemory = "recalled, not read: check Miller (ed.) 2012, Minimum Standards for Wildlife Rehabilitation, 4th ed."
)

// enclosureClasses in PRACTICE.md's order. Metric sizes are PRACTICE.md's.
var enclosureClasses = []EnclosureClass{
	{"raptor-small", "kestrel, merlin, small kites", 4.9, 2.4, 2.4, "16×8×8", "", ProvPublished, citeMinStd},
	{"raptor-largest", "largest raptors: vultures, osprey, large falcons, large buteos", 30.5, 6.1, 4.9, "100×20×16", "", ProvPublished, citeMinStd},
	{"owl-small", "small owls", 2.4, 2.4, 2.4, "8×8×8", "", ProvPublished, citeMinStd},
	{"owl-medium", "medium owls (barn owl)", 9, 3, 3.6, "30×10×12", "", ProvPublished, citeMinStd},
	{"owl-large", "large owls (great horned owl)", 15, 3, 3.6, "50×10×12", "", ProvPublished, citeMinStd},
	{"songbird-medium", "medium songbirds", 2.4, 1.2, 1.2, "8×4×4", "for 4–6 birds; 16×8×8 ft (4.9×2.4×2.4 m) recommended before release", ProvPublished, citeMinStd},
	{"dove", "pigeons, doves", 3.6, 2.5, 2.5, "12×8×8", "", ProvPublished, citeMinStd},
	{"rail-coot", "rails, coots", 2.4, 1.2, 2.4, "8×4×8", "plus a pool 114 cm across and 20 cm deep", ProvPublished, citeMinStd},
	{"heron", "herons, egrets", 5, 2.5, 3.5, "16×8×12", "for up to 20 birds (chapter authors)", ProvPublished, citeMinStd},
	{"raptor-medium", "medium buteos (red-tailed hawk size)", 15, 3, 3.6, "50×10×12", "about this size", ProvFromMemory, citeMinStdMemory},
	{"eagle", "eagles", 30.5, 6.1, 4.9, "100×20×16", "at least this size", ProvFromMemory, citeMinStdMemory},
}

// EnclosureClasses lists the enclosure classes (a fresh copy).
func EnclosureClasses() []EnclosureClass { return slices.Clone(enclosureClasses) }

// Enclosure returns the enclosure class with the given id.
func Enclosure(id string) (EnclosureClass, bool) {
	for _, e := range enclosureClasses {
		if e.ID == id {
			return e, true
		}
	}
	return EnclosureClass{}, false
}
