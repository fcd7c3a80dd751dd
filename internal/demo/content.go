package demo

// The word material of the corpus. Every name and sentence here is
// invented for bowline's demo. Templates hold {slot} markers that fill
// replaces; texts never hold tabs, newlines, backslashes or double quotes.
//
// The sentences are written so that a learner has work to do: some words
// belong to more than one team (unlock, battery, screen, charged, account,
// station names that end in "dock"), and sentiment often turns on a
// negation ("I was charged twice" against "I was not charged twice", "the
// bike never unlocked" against "the brakes never failed me").

// stationNames are invented stations of the Pellwick network.
var stationNames = []string{
	"Harlow Quay", "Tansy Market", "Orrin Yard", "Kestle Green", "Wexcombe Bridge",
	"Linden Steps", "Pellwick Central", "Old Ropeworks", "Café Row", "Saltmarsh Gate",
	"Ferncastle Road", "Brindle Park", "Mossop Square", "Quillon Wharf", "Ashgrove Halls",
	"Tollery Corner", "Nettlebank", "Hobart Mills", "Candlewick Row", "Dunmere Street",
	"Sorrel Court", "Vane Hill", "Glasswork Lane", "Pellwick Museum", "Upper Tarrow",
}

// streets are invented street names.
var streets = []string{
	"Marrow Lane", "Quince Street", "Ottery Road", "Brèche Lane", "Haddle Hill",
	"Corvin Avenue", "Lantern Walk", "Tiller Street", "Gorse Rise", "Wick Parade",
	"Mallory Bank", "Frith Road", "Pennon Street", "Elder Row", "Sluice Lane",
	"the river path", "the canal towpath", "the old tram line",
}

var months = []string{"January", "February", "March", "April", "May", "June", "July",
	"August", "September", "October", "November", "December"}

var days = []string{"Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"}

// handles start invented e-mail addresses at example.org.
var handles = []string{"rider", "commuter", "pedal.fan", "m.k", "cyclist_", "pw.user"}

var ticketOpeners = []string{
	"Hi,", "Hello,", "Hi team,", "Hello support,", "Dear Pellwick support,", "Good morning,",
	"Ticket {ticket}.", "Re: ticket {ticket}", "Following up on {ticket}.", "Hi, this is about my ride on {date}.",
	"Hello, I have a question.", "Hi there,",
}

var reviewOpeners = []string{
	"Rode from {station} to {street} this morning.",
	"Third week using Pellwick for my commute.",
	"Quick review after my ride on {date}.",
	"I use the bikes most weekdays.",
	"Took a bike at {time} today.",
	"Been a member since {year}.",
	"Tried Pellwick for the first time on {date}.",
	"Weekend ride along {street}.",
	"My usual trip is {station} to {station2}.",
	"Short ride to work today.",
}

// context sentences carry no team and no mood.
var context = []string{
	"It was around {time} on {date}.",
	"I was riding from {station} to {station2}.",
	"This happened near {street}.",
	"I have been a member since {year}.",
	"The ride was about {minutes} minutes.",
	"Grabbed a coffee at the café by {station} first.",
	"It was raining a bit.",
	"I ride this way most days.",
	"My partner uses the same account.",
	"I was on my way to work.",
	"This was on {date} at {time}.",
	"Maybe I was naïve to expect a bike at {time}.",
	"I started at {station}.",
	"It was a busy evening near {street}.",
}

// cores[team][sentiment] are the sentences that carry the labels.
// Teams: billing, bikes, docks, app. Sentiments: positive, negative, neutral.
var cores = [4][3][]string{
	{ // billing
		{ // positive
			"I was not charged twice after all, thanks for checking.",
			"The refund of {amount} came through within two days.",
			"Paying with my card is quick and the receipt arrives right away.",
			"The monthly pass is good value at {amount}.",
			"Support fixed the wrong fare and refunded me the same day.",
			"The student discount made my commute much cheaper.",
			"No hidden fees, the price is exactly what the app shows.",
			"The invoice for my employer was clear and correct.",
			"Glad the deposit was returned without any fuss.",
			"The annual pass has already paid for itself.",
			"I have never had a billing problem in two years.",
			"The {amount} fare is fair for a {minutes} minute ride.",
			"Someone refunded ticket {ticket} within an hour, impressive.",
			"My statement matched every ride to the cent.",
		},
		{ // negative
			"I was charged twice for one ride from {station}.",
			"The app says {amount} but my bank shows {amount2}.",
			"Still waiting for the refund you promised on {date}.",
			"My monthly pass was renewed even though I cancelled it.",
			"There is a {amount} fee on my statement that nobody can explain.",
			"The refund never arrived.",
			"I wasn't refunded for the ride that never started.",
			"You took a {amount} deposit and never gave it back.",
			"The fare for a {minutes} minute ride should not be {amount}.",
			"The receipt does not match what left my card.",
			"Overcharged again, {amount} for a short trip.",
			"My card ending {card} was billed after the ride had ended.",
			"The annual pass price went up without any warning.",
			"Nobody answers about the double charge on ticket {ticket}.",
			"I was charged {amount} for a bike I never rode.",
		},
		{ // neutral
			"Could you send me an invoice for {month}?",
			"How do I change the card on my account?",
			"Is the annual pass cheaper than paying per ride?",
			"Please confirm whether ticket {ticket} was refunded.",
			"I would like a receipt for the ride on {date}.",
			"What is the fee for keeping a bike longer than {minutes} minutes?",
			"Can I pay the deposit with a different card?",
			"Just checking the fare rules for weekend rides.",
			"Does the monthly pass renew automatically?",
			"Is there a discount for students or pensioners?",
			"My employer needs the invoice with our company address.",
		},
	},
	{ // bikes
		{ // positive
			"The brakes never failed me, even in the rain.",
			"Bike {bike} rode smoothly from {station} to {street}.",
			"The new e-bikes climb {street} without any effort.",
			"Lights, bell and brakes all worked perfectly.",
			"The gears shift cleanly and the saddle is comfortable.",
			"The tyres were pumped and the chain was oiled.",
			"Not a single problem with the bike, it felt brand new.",
			"The battery was fully charged when I picked it up.",
			"Lovely light bike, easy to ride with a full basket.",
			"Whoever services these bikes is doing a great job.",
			"The saddle didn't slip once on a {minutes} minute ride.",
			"Bike {bike} had new brake pads and it showed.",
		},
		{ // negative
			"The brakes on bike {bike} barely work.",
			"The chain kept slipping all the way to {street}.",
			"Flat tyre again, second time this week.",
			"The saddle wouldn't stay up, it slid down every few minutes.",
			"The gears on bike {bike} jump whenever I pedal hard.",
			"The front light was not working after dark.",
			"The e-bike battery died halfway up {street}.",
			"The handlebar is loose and the bell is missing.",
			"The bike never unlocked, so I walked.",
			"Squeaky pedals and a wobbly back wheel.",
			"The basket was bent and the mudguard rattled.",
			"Whoever checks these bikes is not doing it.",
			"Bike {bike} has a puncture and nobody has fixed it.",
			"The battery wasn't charged, the e-bike was useless.",
		},
		{ // neutral
			"How often are the bikes serviced?",
			"Bike {bike} has a slightly bent basket, just so you know.",
			"Is there a height limit for the saddle?",
			"Can I report a flat tyre from the app?",
			"Which stations have e-bikes in the morning?",
			"The bell on bike {bike} is a bit quiet.",
			"Do the e-bikes have a speed limit?",
			"Can I carry a child seat on the bikes?",
			"How far does an e-bike go on one battery?",
		},
	},
	{ // docks
		{ // positive
			"There is always a free slot at {station}, which makes my commute easy.",
			"The new dock at {station} works perfectly.",
			"The bike clicked into the dock and the light turned green straight away.",
			"Love that {station} is never full in the evening.",
			"Finally a station near {street}, thank you.",
			"Returning the bike took two seconds.",
			"The kiosk at {station} was quick and easy to use.",
			"The docks at {station} were not full for once, great to see.",
			"Plenty of bikes at {station} every morning.",
			"The extra bays at {station} made a real difference.",
			"The dock released the bike on the first try.",
		},
		{ // negative
			"The dock at {station} was full again, I had to ride on to {station2}.",
			"The bike wouldn't lock into the dock, the light stayed red.",
			"{station} has been empty every morning this week.",
			"I returned the bike but the dock didn't register it.",
			"Half the slots at {station} are out of order.",
			"The kiosk screen at {station} is frozen.",
			"Slot {slot} at {station} never released the bike.",
			"No free bays anywhere near {street} at {time}.",
			"The station map shows bikes that are not there.",
			"The dock light turned green but the ride was not ended.",
			"The bike never unlocked from slot {slot}.",
			"Every dock at {station} was broken on {date}.",
		},
		{ // neutral
			"Will there be a new station near {street}?",
			"How many slots does {station} have?",
			"Is the dock at {station} being moved?",
			"What should I do if the dock is full?",
			"The dock at {station} beeps twice when locking, is that normal?",
			"Are the docks at {station} open at night?",
			"Where is the nearest station to {street}?",
		},
	},
	{ // app
		{ // positive
			"The new app update is much faster.",
			"The map shows free bikes and slots accurately.",
			"Scanning the QR code unlocks the bike in a second.",
			"Love the ride history screen.",
			"Logging in is easy now.",
			"The app hasn't crashed once since the update.",
			"Notifications when my ride ends are really helpful.",
			"Dark mode in the app is lovely at night.",
			"The app never lost my ride, even offline.",
			"Resetting my password took a minute.",
			"The route planner in the app is spot on.",
		},
		{ // negative
			"The app crashes every time I open the map.",
			"I cannot log in since the last update.",
			"The QR code scan fails and nothing happens.",
			"The app shows the ride as still running although I docked the bike at {station}.",
			"Password reset emails never arrive.",
			"The map is not loading and the screen stays white.",
			"Bluetooth doesn't connect, so the bike never unlocked.",
			"Notifications arrive an hour late.",
			"The new version drains my phone battery.",
			"I was logged out of my account again.",
			"The app froze at checkout and I lost my ride.",
			"The login page just spins.",
		},
		{ // neutral
			"Is there a version of the app for tablets?",
			"How do I delete my account?",
			"Can the app show the route I took?",
			"Which phones does the app support?",
			"Where do I find the ride history in the app?",
			"Can I turn off the app notifications?",
			"Does the app work without mobile data?",
			"How do I change my password?",
		},
	},
}

// mirrors[team] are pairs of sentences, {positive, negative}, with the
// same words but for a negation or an "always"/"never" swap. The negation
// sits on the positive side in some pairs and on the negative side in
// others, so single words tell the pair apart poorly; word pairs ("not
// charged", "never failed") tell it apart well.
var mirrors = [4][][2]string{
	{ // billing
		{"I was not charged twice.", "I was charged twice."},
		{"The receipt was correct.", "The receipt was not correct."},
		{"There was no extra fee on my statement.", "There was an extra fee on my statement."},
		{"The refund always arrived within a day.", "The refund never arrived within a day."},
		{"I never paid more than the fare shown.", "I always paid more than the fare shown."},
		{"The {amount} deposit came back in full.", "The {amount} deposit never came back in full."},
		{"Support never ignored my refund request.", "Support always ignored my refund request."},
	},
	{ // bikes
		{"The brakes never failed.", "The brakes always failed."},
		{"The bike always unlocked straight away.", "The bike never unlocked straight away."},
		{"The tyres on bike {bike} were not flat.", "The tyres on bike {bike} were flat."},
		{"The e-bike battery was charged.", "The e-bike battery was not charged."},
		{"The saddle stayed where I set it.", "The saddle never stayed where I set it."},
		{"The lights never went out.", "The lights always went out."},
	},
	{ // docks
		{"The dock at {station} was not full.", "The dock at {station} was full."},
		{"The bike did lock into the dock first time.", "The bike did not lock into the dock first time."},
		{"{station} had free slots.", "{station} had no free slots."},
		{"The dock registered my return.", "The dock never registered my return."},
		{"The dock light never stayed red.", "The dock light always stayed red."},
		{"There were no queues at {station} at {time}.", "There were queues at {station} at {time}."},
	},
	{ // app
		{"The app never froze at checkout.", "The app always froze at checkout."},
		{"The map always loaded quickly.", "The map never loaded quickly."},
		{"I could log in without trouble.", "I could not log in without trouble."},
		{"The QR code scanned first time.", "The QR code never scanned first time."},
		{"Notifications were not late.", "Notifications were late."},
		{"No ride went missing from my history.", "A ride went missing from my history."},
	},
}

// vague sentences carry a mood but no team: moods[0] positive, [1]
// negative, [2] neutral.
var vague = [3][]string{
	{"Everything was fine today.", "Good experience overall.", "All sorted now, thank you.", "Smooth as always."},
	{"Worst experience this month.", "Something always goes wrong.", "Same problem as last week.", "Nothing works as it should."},
	{"Just a quick question about my ride on {date}.", "I have a question about my account.", "Please call me back.", "Can someone get in touch?"},
}

// moods are team-free sentences of feeling; moods[0] positive, moods[1]
// negative. Several turn on a negation.
var moods = [2][]string{
	{
		"I am not disappointed at all.",
		"Really happy with it.",
		"Couldn't be happier.",
		"No complaints from me.",
		"It just works.",
		"Not bad at all, honestly.",
	},
	{
		"I am not happy about this.",
		"This is not good enough.",
		"Really frustrating.",
		"I can't rely on this.",
		"Never again.",
		"Not impressed.",
	},
}

// asides lead into a remark about another team's matter.
var asides = []string{"Also, ", "By the way, ", "On another note, ", "Separately, ", "And ", "Oh, and "}

// closers[0..2] end positive, negative and neutral messages; closers[3]
// are the polite thanks that also end many complaints.
var closers = [4][]string{
	{"Thanks!", "Great service.", "Keep it up.", "Five stars from me.", "Would recommend.", "Much appreciated.", "Brilliant."},
	{"Please fix this.", "Very disappointed.", "This is the third time.", "Sort it out please.", "Not good enough.", "Fed up.", "I want an answer."},
	{"Thanks.", "Thanks in advance.", "Regards.", "Cheers.", "Let me know.", "Best wishes."},
	{"Thanks!", "Much appreciated.", "Thank you!"},
}

var emoji = [3][]string{
	{"🙂", "👍", "🚲", "😊"},
	{"😡", "👎", "🙄", "😤"},
	{"🤔", "🚲", "🙂"},
}
