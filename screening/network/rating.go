package network

// CategoryRating is one category's outcome on a bridge.
type CategoryRating struct {
	Category string
	// Pass: every rated member keeps RF >= 1 under the category's train; Carried: it and
	// every category it dominates pass.
	Pass, Carried bool
	// RF is the lowest rating factor of the rated members under the category's train, Member
	// the member that has it and Limit what limits it there. RF is +Inf, Member "" and Limit
	// "" where the train loads no rated member.
	RF     float64
	Member string
	Limit  Limit
}

// Rating is a bridge's network outcome: its categories and its Cooper E rating.
type Rating struct {
	// Categories are in the order of Categories.
	Categories []CategoryRating
	// Highest names the highest categories carried (Highest of the carried set); none where
	// not even A is carried or no member is rated.
	Highest []string
	// ERating is the bridge's Cooper E rating, its worst member's (EMember); NaN where no
	// member is rated under Cooper E80.
	ERating float64
	EMember string
}

// Carried lists the names of the categories carried, in the standard's order.
func (r Rating) Carried() []string {
	var out []string
	for _, c := range r.Categories {
		if c.Carried {
			out = append(out, c.Category)
		}
	}
	return out
}
