//! Real places for the fictional network: the 50 US states and the District of
//! Columbia with their ISO 3166-2 codes, a rough population weight and a few towns in
//! each. Populations are approximate 2020 census figures in millions, from memory; they
//! only weight the invented population and are not presented as facts.

/// (ISO 3166-2 code, name, approximate population in millions, towns).
pub const STATES: [(&str, &str, f64, &[&str]); 51] = [
    (
        "US-AL",
        "Alabama",
        5.0,
        &["Birmingham", "Montgomery", "Huntsville"],
    ),
    (
        "US-AK",
        "Alaska",
        0.73,
        &["Anchorage", "Fairbanks", "Juneau"],
    ),
    ("US-AZ", "Arizona", 7.2, &["Phoenix", "Tucson", "Flagstaff"]),
    (
        "US-AR",
        "Arkansas",
        3.0,
        &["Little Rock", "Fayetteville", "Fort Smith"],
    ),
    (
        "US-CA",
        "California",
        39.5,
        &[
            "Los Angeles",
            "San Diego",
            "Sacramento",
            "Oakland",
            "Fresno",
        ],
    ),
    (
        "US-CO",
        "Colorado",
        5.8,
        &["Denver", "Colorado Springs", "Boulder"],
    ),
    (
        "US-CT",
        "Connecticut",
        3.6,
        &["Hartford", "New Haven", "Stamford"],
    ),
    (
        "US-DE",
        "Delaware",
        0.99,
        &["Wilmington", "Dover", "Newark"],
    ),
    (
        "US-DC",
        "District of Columbia",
        0.69,
        &["Capitol Hill", "Anacostia", "Adams Morgan"],
    ),
    (
        "US-FL",
        "Florida",
        21.5,
        &["Miami", "Tampa", "Orlando", "Jacksonville"],
    ),
    ("US-GA", "Georgia", 10.7, &["Atlanta", "Savannah", "Athens"]),
    ("US-HI", "Hawaii", 1.46, &["Honolulu", "Hilo"]),
    (
        "US-ID",
        "Idaho",
        1.84,
        &["Boise", "Idaho Falls", "Coeur d'Alene"],
    ),
    (
        "US-IL",
        "Illinois",
        12.8,
        &["Chicago", "Springfield", "Peoria"],
    ),
    (
        "US-IN",
        "Indiana",
        6.8,
        &["Indianapolis", "Fort Wayne", "Bloomington"],
    ),
    (
        "US-IA",
        "Iowa",
        3.2,
        &["Des Moines", "Cedar Rapids", "Iowa City"],
    ),
    ("US-KS", "Kansas", 2.9, &["Wichita", "Topeka", "Lawrence"]),
    (
        "US-KY",
        "Kentucky",
        4.5,
        &["Louisville", "Lexington", "Bowling Green"],
    ),
    (
        "US-LA",
        "Louisiana",
        4.66,
        &["New Orleans", "Baton Rouge", "Shreveport"],
    ),
    ("US-ME", "Maine", 1.36, &["Portland", "Bangor", "Augusta"]),
    (
        "US-MD",
        "Maryland",
        6.2,
        &["Baltimore", "Annapolis", "Frederick"],
    ),
    (
        "US-MA",
        "Massachusetts",
        7.0,
        &["Boston", "Worcester", "Cambridge"],
    ),
    (
        "US-MI",
        "Michigan",
        10.1,
        &["Detroit", "Grand Rapids", "Ann Arbor"],
    ),
    (
        "US-MN",
        "Minnesota",
        5.7,
        &["Minneapolis", "Saint Paul", "Duluth"],
    ),
    (
        "US-MS",
        "Mississippi",
        2.96,
        &["Jackson", "Gulfport", "Hattiesburg"],
    ),
    (
        "US-MO",
        "Missouri",
        6.15,
        &["St. Louis", "Kansas City", "Springfield"],
    ),
    (
        "US-MT",
        "Montana",
        1.08,
        &["Billings", "Missoula", "Bozeman"],
    ),
    ("US-NE", "Nebraska", 1.96, &["Omaha", "Lincoln"]),
    (
        "US-NV",
        "Nevada",
        3.1,
        &["Las Vegas", "Reno", "Carson City"],
    ),
    (
        "US-NH",
        "New Hampshire",
        1.38,
        &["Manchester", "Nashua", "Concord"],
    ),
    (
        "US-NJ",
        "New Jersey",
        9.3,
        &["Newark", "Jersey City", "Trenton"],
    ),
    (
        "US-NM",
        "New Mexico",
        2.1,
        &["Albuquerque", "Santa Fe", "Las Cruces"],
    ),
    (
        "US-NY",
        "New York",
        20.2,
        &["New York", "Buffalo", "Rochester", "Albany"],
    ),
    (
        "US-NC",
        "North Carolina",
        10.4,
        &["Charlotte", "Raleigh", "Asheville"],
    ),
    ("US-ND", "North Dakota", 0.78, &["Fargo", "Bismarck"]),
    (
        "US-OH",
        "Ohio",
        11.8,
        &["Columbus", "Cleveland", "Cincinnati", "Dayton"],
    ),
    (
        "US-OK",
        "Oklahoma",
        3.96,
        &["Oklahoma City", "Tulsa", "Norman"],
    ),
    ("US-OR", "Oregon", 4.24, &["Portland", "Eugene", "Salem"]),
    (
        "US-PA",
        "Pennsylvania",
        13.0,
        &["Philadelphia", "Pittsburgh", "Harrisburg"],
    ),
    (
        "US-RI",
        "Rhode Island",
        1.1,
        &["Providence", "Newport", "Warwick"],
    ),
    (
        "US-SC",
        "South Carolina",
        5.1,
        &["Charleston", "Columbia", "Greenville"],
    ),
    (
        "US-SD",
        "South Dakota",
        0.89,
        &["Sioux Falls", "Rapid City"],
    ),
    (
        "US-TN",
        "Tennessee",
        6.9,
        &["Nashville", "Memphis", "Knoxville"],
    ),
    (
        "US-TX",
        "Texas",
        29.1,
        &["Houston", "Austin", "Dallas", "San Antonio", "El Paso"],
    ),
    ("US-UT", "Utah", 3.27, &["Salt Lake City", "Provo", "Ogden"]),
    (
        "US-VT",
        "Vermont",
        0.64,
        &["Burlington", "Montpelier", "Brattleboro"],
    ),
    (
        "US-VA",
        "Virginia",
        8.6,
        &["Richmond", "Norfolk", "Charlottesville"],
    ),
    (
        "US-WA",
        "Washington",
        7.7,
        &["Seattle", "Spokane", "Tacoma"],
    ),
    (
        "US-WV",
        "West Virginia",
        1.79,
        &["Charleston", "Morgantown", "Huntington"],
    ),
    (
        "US-WI",
        "Wisconsin",
        5.9,
        &["Milwaukee", "Madison", "Green Bay"],
    ),
    ("US-WY", "Wyoming", 0.58, &["Cheyenne", "Casper", "Laramie"]),
];

/// Index of a state by ISO 3166-2 code.
pub fn state_index(code: &str) -> Option<usize> {
    STATES.iter().position(|s| s.0 == code)
}
