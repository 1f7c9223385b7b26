package main

import (
	"fmt"
	"strings"

	"aloft/assess"
)

// citations are every work a value of the table can cite, by key. A value's
// source is "key" or "key|note". Keys "bwd:<study>" are added per study.
var citations = map[string]assess.SourceRef{
	"birdlife":          {Provenance: assess.ProvPublished, Citation: "HBW-BirdLife Checklist v5 (December 2020) taxonomy, as used by AVONET: Tobias, J.A. et al. 2022. AVONET: morphological, ecological and geographical data for all birds. Ecology Letters 25:581–597. doi:10.1111/ele.13898"},
	"avonet":            {Provenance: assess.ProvPublished, Citation: "Tobias, J.A. et al. 2022. AVONET: morphological, ecological and geographical data for all birds. Ecology Letters 25:581–597. doi:10.1111/ele.13898 (CC BY 4.0)"},
	"avonet-mass":       {Provenance: assess.ProvPublished, Citation: "AVONET column Mass, the species mean with sexes pooled: Tobias, J.A. et al. 2022. Ecology Letters 25:581–597. doi:10.1111/ele.13898"},
	"avonet-chord":      {Provenance: assess.ProvPublished, Citation: "AVONET column Wing.Length: carpal joint to the tip of the longest primary on the unflattened wing. Tobias, J.A. et al. 2022. Ecology Letters 25:581–597. doi:10.1111/ele.13898"},
	"avonet-migration":  {Provenance: assess.ProvPublished, Citation: "AVONET column Migration: 1 sedentary, 2 partially migratory, 3 migratory (Tobias & Pigot 2019). Tobias, J.A. et al. 2022. Ecology Letters 25:581–597. doi:10.1111/ele.13898"},
	"avonet-migrant":    {Provenance: assess.ProvDerived, Citation: "a migrant when AVONET's Migration is 2 (partial) or 3 (Tobias, J.A. et al. 2022. Ecology Letters 25:581–597)"},
	"avonet-passerine":  {Provenance: assess.ProvDerived, Citation: "passerine when AVONET's Order1 is Passeriformes (Tobias, J.A. et al. 2022. Ecology Letters 25:581–597)"},
	"ioc-bwd":           {Provenance: assess.ProvPublished, Citation: "IOC World Bird List v13.1 English name, as given in BirdWingData v2.1 (figshare doi:10.6084/m9.figshare.23537892)"},
	"name-memory":       {Provenance: assess.ProvFromMemory, Citation: "English name typed from knowledge following IOC World Bird List usage; not checked against the list"},
	"alerstam2007":      {Provenance: assess.ProvPublished, Citation: "Alerstam, T., Rosén, M., Bäckman, J., Ericson, P.G.P. & Hellgren, O. 2007. Flight speeds among bird species: allometric and phylogenetic effects. PLoS Biology 5(8):e197, Table S1. doi:10.1371/journal.pbio.0050197 (CC BY)"},
	"mass-memory":       {Provenance: assess.ProvFromMemory, Citation: "typed from knowledge: a typical handbook mean of the kind in Dunning, J.B. 2008, CRC Handbook of Avian Body Masses, 2nd ed.; not checked"},
	"range-default":     {Provenance: assess.ProvProjectDefault, Citation: "mean ± 25 % for each sex, and for unknown sex the span of both: a default of this project, not a measured range"},
	"wingfit":           {Provenance: assess.ProvDerived, Citation: "estimated: ln y = β0 + β1·ln(mass) + β2·ln(wing chord), least squares on the measured species of the pool (assess/internal/speciesgen/wingfit), from AVONET mass and chord"},
	"group-rule":        {Provenance: assess.ProvDerived, Citation: "this project's species groups (after PRACTICE.md), assigned from the AVONET family and genus (assess/internal/speciesgen/rules.go)"},
	"launch-bwrc":       {Provenance: assess.ProvPublished, Citation: "British Wildlife Rehabilitation Council, release principles; Wildlife International, release criteria for birds (rehabilitation care pages): raptors and owls must gain height from the ground"},
	"launch-common":     {Provenance: assess.ProvCommonPractice, Citation: "rehabilitation practice as summarised in this project's PRACTICE.md launch-mode table"},
	"launch-memory":     {Provenance: assess.ProvFromMemory, Citation: "PRACTICE.md launch-mode table, where this row is marked from memory"},
	"launch-loon":       {Provenance: assess.ProvPublished, Citation: "wildlife agency and rehabilitator reports (via PRACTICE.md): loons, grebes and alcids take off after a run of 30 m to 400 m over open water and cannot leave land"},
	"launch-swift":      {Provenance: assess.ProvPublished, Citation: "swift rehabilitation guidance (via PRACTICE.md): hand release or smooth flat ground, never thrown or dropped; practice disputed"},
	"launch-hrb":        {Provenance: assess.ProvPublished, Citation: "Duerr, R.S. & Gage, L.J. (eds.) 2020. Hand-Rearing Birds, 2nd ed. Wiley: sustained hovering and insect capture observed before release"},
	"launch-added":      {Provenance: assess.ProvFromMemory, Citation: "this project's addition for a group PRACTICE.md does not list; recalled, not checked"},
	"style-memory":      {Provenance: assess.ProvFromMemory, Citation: "the family's usual flight, recalled from general ornithology; not checked"},
	"feathers-memory":   {Provenance: assess.ProvFromMemory, Citation: "typical count for the family, recalled; check Pyle, P. 1997 and 2008, Identification Guide to North American Birds, Parts I and II, Slate Creek Press"},
	"enclosure-minstd":  {Provenance: assess.ProvPublished, Citation: "Miller, E.A. (ed.) 2012. Minimum Standards for Wildlife Rehabilitation, 4th ed. NWRA & IWRC, via Duerr & Gage (eds.) 2020, Hand-Rearing Birds, 2nd ed."},
	"enclosure-size":    {Provenance: assess.ProvProjectDefault, Citation: "assigned by size to the nearest class that Minimum Standards 2012 lists (a default of this project; check the standard)"},
	"enclosure-memory":  {Provenance: assess.ProvFromMemory, Citation: "a class PRACTICE.md recalls from Minimum Standards 2012 without having read it"},
	"passes-common":     {Provenance: assess.ProvCommonPractice, Citation: "PRACTICE.md default, a centre setting: 10 unbroken passes for raptors and owls, 6 for songbirds, doves and corvids"},
	"prerelease-hrb":    {Provenance: assess.ProvPublished, Citation: "Duerr, R.S. & Gage, L.J. (eds.) 2020. Hand-Rearing Birds, 2nd ed., species chapters; Wildpro, UK Wildlife: First Aid and Care (via PRACTICE.md)"},
	"waterproof-memory": {Provenance: assess.ProvFromMemory, Citation: "PRACTICE.md default, a centre setting marked from memory there: waterproof for 3 consecutive days on continuous pool access"},
	"swift-guide":       {Provenance: assess.ProvPublished, Citation: "swift rehabilitation guidance (via PRACTICE.md)"},
	"margin-default":    {Provenance: assess.ProvProjectDefault, Citation: "blank: the default allometry M_ref = 1.8·m^(−1/6), clamped to [1.1, 4.0] (SCIENCE.md §5)"},
	"muscle-unknown":    {Provenance: assess.ProvProjectDefault, Citation: "blank: no published flight-muscle fraction has been entered for this species"},
}

// bwdCitation returns the citation key of a BirdWingData row's study,
// adding the citation on first use.
func bwdCitation(study string) string {
	key := "bwd:" + study
	if _, ok := citations[key]; !ok {
		citations[key] = assess.SourceRef{Provenance: assess.ProvPublished,
			Citation: study + ", the original study of a BirdWingData v2.1 row (figshare doi:10.6084/m9.figshare.23537892)"}
	}
	return key
}

func genus(name string) string { g, _, _ := strings.Cut(name, " "); return g }

var familyGroup = map[string]assess.Group{
	"Accipitridae": assess.GroupRaptor, "Pandionidae": assess.GroupRaptor,
	"Falconidae": assess.GroupRaptor, "Cathartidae": assess.GroupRaptor,
	"Strigidae": assess.GroupOwl, "Tytonidae": assess.GroupOwl,
	"Corvidae": assess.GroupCorvid, "Hirundinidae": assess.GroupSwallow,
	"Apodidae": assess.GroupSwift, "Trochilidae": assess.GroupHummingbird,
	"Caprimulgidae": assess.GroupNightjar, "Columbidae": assess.GroupDove,
	"Picidae":     assess.GroupWoodpecker,
	"Alcedinidae": assess.GroupOtherLandbird, "Cuculidae": assess.GroupOtherLandbird,
	"Upupidae": assess.GroupOtherLandbird, "Meropidae": assess.GroupOtherLandbird,
	"Coraciidae":   assess.GroupOtherLandbird,
	"Charadriidae": assess.GroupShorebird, "Scolopacidae": assess.GroupShorebird,
	"Haematopodidae": assess.GroupShorebird, "Recurvirostridae": assess.GroupShorebird,
	"Glareolidae": assess.GroupShorebird, "Burhinidae": assess.GroupShorebird,
	"Laridae": assess.GroupGull, "Stercorariidae": assess.GroupGull, "Rynchopidae": assess.GroupGull,
	"Ardeidae": assess.GroupHeron,
	"Gruidae":  assess.GroupCraneStork, "Ciconiidae": assess.GroupCraneStork,
	"Threskiornithidae": assess.GroupCraneStork,
	"Rallidae":          assess.GroupRail,
	"Phasianidae":       assess.GroupGamebird, "Odontophoridae": assess.GroupGamebird,
	"Gaviidae": assess.GroupLoonGrebeAlcid, "Podicipedidae": assess.GroupLoonGrebeAlcid,
	"Alcidae":        assess.GroupLoonGrebeAlcid,
	"Procellariidae": assess.GroupSeabird, "Hydrobatidae": assess.GroupSeabird,
	"Oceanitidae": assess.GroupSeabird, "Diomedeidae": assess.GroupSeabird, "Sulidae": assess.GroupSeabird,
	"Phalacrocoracidae": assess.GroupCormorantPelican, "Pelecanidae": assess.GroupCormorantPelican,
	"Anhingidae": assess.GroupCormorantPelican,
}

// groupOf assigns a species to its group from its AVONET family and genus.
func groupOf(a *avonetRow) (assess.Group, error) {
	g := genus(a.Name)
	switch {
	case a.Family == "Anatidae":
		switch g {
		case "Cygnus", "Anser", "Branta":
			return assess.GroupSwanGoose, nil
		case "Anas", "Mareca", "Spatula", "Aix", "Tadorna", "Dendrocygna", "Cairina":
			return assess.GroupDabblingDuck, nil
		}
		return assess.GroupDivingDuck, nil
	case g == "Fulica":
		return assess.GroupDivingDuck, nil
	}
	if grp, ok := familyGroup[a.Family]; ok {
		return grp, nil
	}
	if a.Order == "Passeriformes" {
		return assess.GroupSongbird, nil
	}
	return "", fmt.Errorf("%s (%s): no group for the family", a.Name, a.Family)
}

// launchCitation is the source of each group's normal launch mode.
var launchCitation = map[assess.Group]string{
	assess.GroupRaptor: "launch-bwrc", assess.GroupOwl: "launch-bwrc",
	assess.GroupSongbird: "launch-common", assess.GroupCorvid: "launch-common",
	assess.GroupDove: "launch-common", assess.GroupWoodpecker: "launch-common",
	assess.GroupShorebird: "launch-common", assess.GroupHeron: "launch-common",
	assess.GroupGull: "launch-common", assess.GroupSwallow: "launch-common",
	assess.GroupGamebird: "launch-memory", assess.GroupDabblingDuck: "launch-memory",
	assess.GroupDivingDuck: "launch-memory", assess.GroupSwanGoose: "launch-memory",
	assess.GroupSeabird: "launch-memory", assess.GroupLoonGrebeAlcid: "launch-loon",
	assess.GroupSwift: "launch-swift", assess.GroupHummingbird: "launch-hrb",
	assess.GroupNightjar: "launch-added", assess.GroupOtherLandbird: "launch-added",
	assess.GroupCraneStork: "launch-added", assess.GroupRail: "launch-added",
	assess.GroupCormorantPelican: "launch-added",
}

// flyingStyle returns the usual flight of the species' family or genus.
func flyingStyle(grp assess.Group, a *avonetRow) assess.FlyingStyle {
	g := genus(a.Name)
	switch {
	case g == "Accipiter" || g == "Circus" || a.Family == "Falconidae" || g == "Milvus":
		return assess.StyleFlapGlide
	case a.Family == "Procellariidae" || a.Family == "Diomedeidae":
		return assess.StyleDynamicSoaring
	case a.Family == "Hydrobatidae" || a.Family == "Oceanitidae":
		return assess.StyleFlapGlide
	case a.Family == "Pelecanidae" || a.Family == "Ciconiidae" || a.Family == "Gruidae":
		return assess.StyleSoaring
	case a.Family == "Threskiornithidae":
		return assess.StyleFlapGlide
	case a.Family == "Sturnidae" || a.Family == "Bombycillidae":
		return assess.StyleFlapGlide
	}
	return map[assess.Group]assess.FlyingStyle{
		assess.GroupRaptor: assess.StyleSoaring, assess.GroupOwl: assess.StyleFlapGlide,
		assess.GroupSongbird: assess.StyleBounding, assess.GroupCorvid: assess.StyleFlapping,
		assess.GroupSwallow: assess.StyleAerial, assess.GroupSwift: assess.StyleAerial,
		assess.GroupHummingbird: assess.StyleHovering, assess.GroupNightjar: assess.StyleAerial,
		assess.GroupDove: assess.StyleFlapping, assess.GroupWoodpecker: assess.StyleBounding,
		assess.GroupOtherLandbird: assess.StyleFlapping, assess.GroupShorebird: assess.StyleFlapping,
		assess.GroupGull: assess.StyleFlapGlide, assess.GroupHeron: assess.StyleFlapping,
		assess.GroupCraneStork: assess.StyleSoaring, assess.GroupRail: assess.StyleFlapping,
		assess.GroupGamebird: assess.StyleBurst, assess.GroupDabblingDuck: assess.StyleFlapping,
		assess.GroupDivingDuck: assess.StyleFlapping, assess.GroupSwanGoose: assess.StyleFlapping,
		assess.GroupLoonGrebeAlcid: assess.StyleFlapping, assess.GroupSeabird: assess.StyleFlapGlide,
		assess.GroupCormorantPelican: assess.StyleFlapping,
	}[grp]
}

// feathers: primaries, secondaries (with tertials) per wing, rectrices.
type feathers [3]int

// Family counts, recalled (see citation "feathers-memory").
var familyFeathers = map[string]feathers{
	"Accipitridae": {10, 13, 12}, "Pandionidae": {10, 13, 12}, "Falconidae": {10, 12, 12},
	"Cathartidae": {10, 18, 12}, "Strigidae": {10, 14, 12}, "Tytonidae": {10, 14, 12},
	"Apodidae": {10, 10, 10}, "Trochilidae": {10, 6, 10}, "Caprimulgidae": {10, 13, 10},
	"Columbidae": {10, 12, 12}, "Picidae": {10, 11, 12},
	"Alcedinidae": {10, 13, 12}, "Cuculidae": {10, 9, 10}, "Upupidae": {10, 11, 10},
	"Meropidae": {10, 13, 12}, "Coraciidae": {10, 11, 12},
	"Charadriidae": {10, 14, 12}, "Scolopacidae": {10, 14, 12}, "Haematopodidae": {10, 14, 12},
	"Recurvirostridae": {10, 14, 12}, "Laridae": {10, 20, 12}, "Stercorariidae": {10, 18, 12},
	"Rynchopidae": {10, 18, 12}, "Alcidae": {10, 16, 12},
	"Ardeidae": {10, 16, 12}, "Gruidae": {10, 18, 12}, "Ciconiidae": {11, 22, 12},
	"Threskiornithidae": {11, 16, 12}, "Rallidae": {10, 12, 12},
	"Phasianidae": {10, 14, 16}, "Odontophoridae": {10, 11, 12},
	"Anatidae": {10, 16, 16}, "Gaviidae": {10, 22, 18}, "Podicipedidae": {12, 20, 0},
	"Procellariidae": {10, 22, 12}, "Hydrobatidae": {10, 12, 12}, "Oceanitidae": {10, 12, 12},
	"Diomedeidae": {10, 30, 12}, "Sulidae": {10, 26, 12},
	"Phalacrocoracidae": {11, 18, 12}, "Pelecanidae": {11, 30, 22}, "Anhingidae": {10, 18, 12},
}

// Genus exceptions to the family counts.
var genusFeathers = map[string]feathers{
	"Cygnus": {10, 22, 22}, "Anser": {10, 18, 16}, "Branta": {10, 18, 16},
	"Zenaida": {10, 12, 14}, "Phasianus": {10, 18, 18}, "Meleagris": {10, 18, 18},
	"Botaurus": {10, 16, 10}, "Ixobrychus": {10, 16, 10},
}

// nineFamilies are passerine families with nine visible primaries.
var nineFamilies = map[string]bool{
	"Fringillidae": true, "Parulidae": true, "Passerellidae": true, "Emberizidae": true,
	"Icteridae": true, "Cardinalidae": true, "Thraupidae": true, "Calcariidae": true,
	"Motacillidae": true, "Hirundinidae": true,
}

func featherCounts(a *avonetRow) (feathers, error) {
	if f, ok := genusFeathers[genus(a.Name)]; ok {
		return f, nil
	}
	if f, ok := familyFeathers[a.Family]; ok {
		return f, nil
	}
	if a.Order == "Passeriformes" {
		if nineFamilies[a.Family] {
			return feathers{9, 9, 12}, nil
		}
		return feathers{10, 9, 12}, nil
	}
	return feathers{}, fmt.Errorf("%s (%s): no feather counts for the family", a.Name, a.Family)
}

// enclosure returns the species' enclosure class and its citation key; ""
// when PRACTICE.md lists none for the group.
func enclosure(grp assess.Group, a *avonetRow) (id, cite string) {
	g := genus(a.Name)
	switch grp {
	case assess.GroupRaptor:
		return raptorEnclosure(g, a)
	case assess.GroupOwl:
		switch {
		case a.Name == "Tyto alba":
			return "owl-medium", "enclosure-minstd"
		case a.Name == "Bubo virginianus":
			return "owl-large", "enclosure-minstd"
		case a.MassG < 250:
			return "owl-small", "enclosure-size"
		case a.MassG < 700:
			return "owl-medium", "enclosure-size"
		}
		return "owl-large", "enclosure-size"
	case assess.GroupSongbird:
		return "songbird-medium", "enclosure-size"
	case assess.GroupDove:
		return "dove", "enclosure-minstd"
	case assess.GroupRail:
		return "rail-coot", "enclosure-minstd"
	case assess.GroupHeron:
		return "heron", "enclosure-minstd"
	}
	if g == "Fulica" {
		return "rail-coot", "enclosure-minstd"
	}
	return "", ""
}

func raptorEnclosure(g string, a *avonetRow) (id, cite string) {
	switch {
	case a.Name == "Falco sparverius" || a.Name == "Falco tinnunculus" || a.Name == "Falco columbarius" ||
		a.Name == "Falco naumanni" || g == "Ictinia" || g == "Elanus" || g == "Elanoides":
		return "raptor-small", "enclosure-minstd"
	case a.Name == "Falco peregrinus" || a.Name == "Falco mexicanus" || a.Name == "Falco rusticolus" ||
		a.Family == "Cathartidae" || g == "Gyps" || g == "Neophron" || g == "Pandion":
		return "raptor-largest", "enclosure-minstd"
	case g == "Buteo" && a.MassG >= 1200:
		return "raptor-largest", "enclosure-minstd"
	case g == "Buteo":
		return "raptor-medium", "enclosure-memory"
	case g == "Aquila" || g == "Haliaeetus":
		return "eagle", "enclosure-memory"
	case g == "Circaetus" || g == "Hieraaetus":
		return "eagle", "enclosure-size"
	case g == "Falco" || a.MassG < 250:
		return "raptor-small", "enclosure-size"
	}
	return "raptor-medium", "enclosure-size"
}

func intp(v int) *int { return &v }

// minPasses is PRACTICE.md's default of unbroken passes; nil for groups it
// leaves to the centre.
func minPasses(grp assess.Group) *int {
	switch grp {
	case assess.GroupRaptor, assess.GroupOwl:
		return intp(10)
	case assess.GroupSongbird, assess.GroupDove, assess.GroupCorvid:
		return intp(6)
	}
	return nil
}

// prerelease returns PRACTICE.md's least time in pre-release housing (days)
// and a note, or nil.
func prerelease(grp assess.Group, a *avonetRow) (*int, string) {
	switch {
	case a.Family == "Turdidae":
		return intp(10), "thrushes 10–14 days outdoors"
	case grp == assess.GroupSongbird:
		return intp(14), "songbirds at least 14 days outdoors"
	case grp == assess.GroupDove:
		return intp(7), "self-feeding outside at least 7 days and not winded by short flights"
	case a.Family == "Rallidae":
		return intp(7), "rails and coots 7–14 days"
	case grp == assess.GroupSeabird || a.Family == "Alcidae":
		return intp(14), "about 2 weeks in an outdoor pool enclosure after a stay of more than a few days"
	}
	return nil, ""
}
