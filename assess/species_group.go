package assess

import "slices"

// Group is a species group as rehabilitation practice treats it: one launch
// mode, one set of safe trials, one set of release criteria
// (/work/shared/PRACTICE.md). Every species in the table belongs to one.
type Group string

// Groups. The first eighteen follow PRACTICE.md's rows; rails, cranes and
// storks, cormorants and pelicans, nightjars and the remaining land birds
// are this project's additions for species PRACTICE.md does not place.
const (
	GroupRaptor           Group = "raptor"            // hawks, falcons, eagles, kites, ospreys, vultures
	GroupOwl              Group = "owl"               // owls
	GroupSongbird         Group = "songbird"          // perching birds other than corvids, swallows
	GroupCorvid           Group = "corvid"            // crows, ravens, jays, magpies
	GroupSwallow          Group = "swallow"           // swallows, martins
	GroupSwift            Group = "swift"             // swifts
	GroupHummingbird      Group = "hummingbird"       // hummingbirds
	GroupNightjar         Group = "nightjar"          // nightjars, nighthawks
	GroupDove             Group = "dove"              // pigeons, doves
	GroupWoodpecker       Group = "woodpecker"        // woodpeckers, wrynecks
	GroupOtherLandbird    Group = "other-landbird"    // kingfishers, cuckoos, hoopoes, bee-eaters, rollers
	GroupShorebird        Group = "shorebird"         // plovers, sandpipers, oystercatchers, avocets
	GroupGull             Group = "gull"              // gulls, terns, skuas, skimmers
	GroupHeron            Group = "heron"             // herons, egrets, bitterns
	GroupCraneStork       Group = "crane-stork"       // cranes, storks, ibises, spoonbills
	GroupRail             Group = "rail"              // rails, crakes, moorhens, gallinules (coots: diving ducks)
	GroupGamebird         Group = "gamebird"          // pheasants, grouse, partridges, quails, turkeys
	GroupDabblingDuck     Group = "dabbling-duck"     // dabbling ducks, shelducks, whistling ducks
	GroupDivingDuck       Group = "diving-duck"       // diving ducks, sea ducks, mergansers, stiff-tails, coots
	GroupSwanGoose        Group = "swan-goose"        // swans, geese
	GroupLoonGrebeAlcid   Group = "loon-grebe-alcid"  // loons, grebes, auks
	GroupSeabird          Group = "seabird"           // shearwaters, petrels, albatrosses, gannets
	GroupCormorantPelican Group = "cormorant-pelican" // cormorants, shags, pelicans, anhingas
)

// Groups lists every group, land birds first.
var Groups = []Group{GroupRaptor, GroupOwl, GroupSongbird, GroupCorvid, GroupSwallow,
	GroupSwift, GroupHummingbird, GroupNightjar, GroupDove, GroupWoodpecker,
	GroupOtherLandbird, GroupShorebird, GroupGull, GroupHeron, GroupCraneStork, GroupRail,
	GroupGamebird, GroupDabblingDuck, GroupDivingDuck, GroupSwanGoose, GroupLoonGrebeAlcid,
	GroupSeabird, GroupCormorantPelican}

// groupInfo is what the app knows of a group as a whole.
type groupInfo struct {
	label  string
	launch LaunchMode   // the normal launch mode (PRACTICE.md "Launch modes")
	safe   []LaunchMode // trials offered without a stated reason, normal mode first
}

// groupTable: launch modes from PRACTICE.md's table; the safe trial lists
// are this project's reading of its "Safety" paragraph [common practice]:
// the group's normal mode, the modes of the same kind (ground or water),
// a drop only where a launch from height is normal practice, and never a
// land trial for loons, grebes and alcids or a drop for swifts.
var groupTable = map[Group]groupInfo{
	GroupRaptor:           {"Hawks, falcons, eagles, kites, ospreys, vultures", LaunchStanding, []LaunchMode{LaunchStanding, LaunchWindOrHeight, TrialDrop}},
	GroupOwl:              {"Owls", LaunchStanding, []LaunchMode{LaunchStanding, TrialDrop}},
	GroupSongbird:         {"Songbirds", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupCorvid:           {"Crows, ravens, jays, magpies", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupSwallow:          {"Swallows, martins", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupSwift:            {"Swifts", LaunchHand, []LaunchMode{LaunchHand, LaunchStanding}},
	GroupHummingbird:      {"Hummingbirds", LaunchHover, []LaunchMode{LaunchHover, LaunchHand}},
	GroupNightjar:         {"Nightjars, nighthawks", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupDove:             {"Pigeons, doves", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupWoodpecker:       {"Woodpeckers", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupOtherLandbird:    {"Kingfishers, cuckoos, hoopoes, bee-eaters, rollers", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupShorebird:        {"Shorebirds", LaunchStanding, []LaunchMode{LaunchStanding, LaunchHand}},
	GroupGull:             {"Gulls, terns, skuas", LaunchStanding, []LaunchMode{LaunchStanding, LaunchRunUpLand, LaunchWindOrHeight}},
	GroupHeron:            {"Herons, egrets, bitterns", LaunchStanding, []LaunchMode{LaunchStanding, LaunchRunUpLand}},
	GroupCraneStork:       {"Cranes, storks, ibises, spoonbills", LaunchRunUpLand, []LaunchMode{LaunchRunUpLand, LaunchStanding, LaunchWindOrHeight}},
	GroupRail:             {"Rails, crakes, gallinules", LaunchStanding, []LaunchMode{LaunchStanding, LaunchRunUpLand, LaunchRunUpWater}},
	GroupGamebird:         {"Gamebirds", LaunchStanding, []LaunchMode{LaunchStanding}},
	GroupDabblingDuck:     {"Dabbling ducks", LaunchWaterSpring, []LaunchMode{LaunchWaterSpring, LaunchStanding, LaunchRunUpWater}},
	GroupDivingDuck:       {"Diving ducks, sea ducks, coots", LaunchRunUpWater, []LaunchMode{LaunchRunUpWater}},
	GroupSwanGoose:        {"Swans, geese", LaunchRunUpWater, []LaunchMode{LaunchRunUpWater, LaunchRunUpLand}},
	GroupLoonGrebeAlcid:   {"Loons, grebes, auks", LaunchRunUpWater, []LaunchMode{LaunchRunUpWater}},
	GroupSeabird:          {"Shearwaters, petrels, albatrosses, gannets", LaunchWindOrHeight, []LaunchMode{LaunchWindOrHeight, LaunchRunUpWater, TrialDrop}},
	GroupCormorantPelican: {"Cormorants, pelicans", LaunchRunUpWater, []LaunchMode{LaunchRunUpWater, LaunchStanding, LaunchWindOrHeight}},
}

// Valid reports whether g is one of Groups.
func (g Group) Valid() bool { _, ok := groupTable[g]; return ok }

// Label is the group's name for people, e.g. "Swallows, martins"; "" for an
// unknown group.
func (g Group) Label() string { return groupTable[g].label }

// NormalLaunchMode is the group's usual way of taking off (PRACTICE.md
// "Launch modes"). A species' own LaunchMode takes precedence.
func (g Group) NormalLaunchMode() LaunchMode { return groupTable[g].launch }

// SafeTrialModes lists the trial modes offered for the group without a stated
// reason, the normal launch mode first (PRACTICE.md "Safety" [common
// practice]). Any other mode needs a reason; a drop always carries a warning
// and a capped height. The slice is a fresh copy; nil for an unknown group.
func (g Group) SafeTrialModes() []LaunchMode { return slices.Clone(groupTable[g].safe) }

// Aquatic reports whether the group lives on the water and is tested for
// waterproofing before release: ducks, swans, geese, loons, grebes, auks,
// seabirds, cormorants and pelicans (PRACTICE.md "Defaults").
func (g Group) Aquatic() bool {
	switch g {
	case GroupDabblingDuck, GroupDivingDuck, GroupSwanGoose, GroupLoonGrebeAlcid,
		GroupSeabird, GroupCormorantPelican:
		return true
	}
	return false
}

// AerialInsectivore reports whether the group feeds on insects caught in
// flight (swifts, swallows, nightjars): such birds need fully normal flight
// and intact outer primaries (PRACTICE.md, Wildlife International release
// criteria).
func (g Group) AerialInsectivore() bool {
	return g == GroupSwift || g == GroupSwallow || g == GroupNightjar
}

// RaptorLike reports whether the group is a raptor or an owl: ranges by sex,
// live-prey capture, fully normal flight, 10 passes by default.
func (g Group) RaptorLike() bool { return g == GroupRaptor || g == GroupOwl }
