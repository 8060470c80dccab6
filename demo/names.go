package demo

// Every name in Port Wren is invented for this scenario. Streets are named after shore birds
// (avenues), trees and shrubs (cross streets) and old trades (lanes); businesses after invented
// island places and invented family names. None is meant to be, or to resemble, a real business,
// brand or place.

// The fixed names: the two main roads through the square, the ring, the fast road out to the
// headland, its slip road, and the hamlet lane beyond.
const (
	MainAvenueName = "Lantern Avenue"
	MainStreetName = "Tidemark Street"
	RingName       = "Gorse Ring"
	ExpresswayName = "Tarrow Expressway"
	SlipName       = "Tarrow Slip"
)

// avenueNames name the avenues other than Lantern Avenue (" Avenue" is appended).
var avenueNames = []string{
	"Curlew", "Plover", "Lapwing", "Kittiwake", "Gannet", "Petrel", "Dunlin", "Whimbrel",
	"Shearwater", "Guillemot", "Redshank", "Turnstone",
}

// streetNames name the cross streets other than Tidemark Street (" Street" is appended).
var streetNames = []string{
	"Rowan", "Alder", "Hazel", "Linden", "Juniper", "Willow", "Hawthorn", "Elder", "Aspen", "Larch",
	"Blackthorn", "Holly", "Sallow",
}

// laneNames name the lane beyond the slip road (" Lane" is appended).
var laneNames = []string{
	"Cooper", "Chandler", "Ropewalk", "Netmender", "Tanner", "Cordwainer", "Wheelwright", "Saddler",
	"Thatcher", "Fletcher",
}

// placeWords are invented island places that businesses are named after ("Saltmeadow Pharmacy").
var placeWords = []string{
	"Wrenquay", "Saltmeadow", "Tidecombe", "Brinewater", "Kelpmoor", "Lanternhill", "Wrackline",
	"Foghollow", "Cobblecove", "Shinglebank", "Ternwick", "Gorsefield", "Seaholly", "Netherquay",
	"Puffinrock", "Tarrowside",
}

// familyNames are invented family names that businesses are named after ("Quennet's Bakehouse").
var familyNames = []string{
	"Quennet", "Marrowby", "Tolvane", "Orrisk", "Pellamy", "Vantreck", "Caskell", "Wendrow",
	"Fallowby", "Skarrett", "Imbery", "Trelloway", "Oddney", "Merrigold", "Hallowby", "Dunmarrow",
	"Ferrick", "Gillimot",
}

// category describes one kind of business: its name, the nouns its shop signs use, whether it may
// carry a family name, the base priority of its markers (0–10: what a driver most likely needs
// ranks highest), and its weight among the businesses of the town centre (0: only by the roads out).
type category struct {
	name      string
	nouns     []string
	family    bool
	priority  int
	townShare int
}

var categories = []category{
	{"bakery", []string{"Bakehouse", "Loaf Shop", "Ovens"}, true, 4, 10},
	{"café", []string{"Coffee Room", "Café", "Tea Room"}, true, 5, 14},
	{"restaurant", []string{"Kitchen", "Dining Rooms", "Grill House", "Supper Room"}, true, 5, 12},
	{"grocer", []string{"Grocer", "Provisions", "Larder", "Corner Store"}, true, 5, 8},
	{"pharmacy", []string{"Pharmacy", "Dispensary", "Apothecary"}, true, 7, 5},
	{"bookshop", []string{"Books", "Bookroom", "Book Cellar"}, true, 2, 4},
	{"hardware", []string{"Hardware", "Ironmongery", "Tool Store"}, true, 3, 4},
	{"florist", []string{"Flowers", "Florist", "Bloom Shop"}, true, 2, 4},
	{"fishmonger", []string{"Fish Counter", "Fishmonger", "Fish Shed"}, true, 3, 4},
	{"barber", []string{"Barbers", "Hair Room", "Clip Shop"}, true, 1, 6},
	{"launderette", []string{"Launderette", "Wash House"}, false, 1, 3},
	{"chandlery", []string{"Chandlery", "Ship Stores", "Rope and Sail"}, true, 2, 3},
	{"post office", []string{"Post Office"}, false, 4, 2},
	{"clinic", []string{"Clinic", "Health Centre", "Surgery"}, false, 9, 2},
	{"hotel", []string{"Hotel", "Inn", "Guest House"}, true, 6, 4},
	{"cinema", []string{"Picture House", "Cinema"}, false, 3, 1},
	{"fuel", []string{"Fuel", "Filling Station", "Pumps"}, true, 8, 2},
	{"garage", []string{"Motor Works", "Garage", "Tyre and Repair"}, true, 6, 0},
	{"farm shop", []string{"Farm Shop", "Dairy", "Orchard Stall"}, true, 4, 0},
}

// categoryByName returns the category called name; the names used in this package all exist.
func categoryByName(name string) *category {
	for i := range categories {
		if categories[i].name == name {
			return &categories[i]
		}
	}
	panic("demo: no business category " + name)
}
