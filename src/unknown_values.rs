//! What a scan cannot use of the attribute values it was given, said once each with
//! where it came from: attribute ids and values the mapping or a friends file produced
//! that the priors do not know (a friend's home in a country the priors' location
//! values do not cover is named as that place), and location values of a priors file
//! that no gazetteer knows as a place.

use std::collections::BTreeMap;

use crate::evidence::location_attributes;
use crate::footprint::{Footprint, Warning};
use crate::lexicon::Gazetteer;
use crate::priors::Priors;

/// Values listed one by one at most; the rest are counted.
const SHOWN: usize = 5;

/// Where an unknown value was first met, and how often.
struct Seen {
    file: Option<String>,
    record: Option<usize>,
    times: usize,
}

/// Attribute ids and values the mapping produced (declared values, friends' public
/// attributes, a friends file's columns) that the priors do not know are reported once
/// each, naming the file and record where each was first met, not silently dropped.
/// With a gazetteer, a value that names a place outside the countries of the priors'
/// location values says so.
pub fn check_attribute_names(
    footprint: &mut Footprint,
    priors: &Priors,
    mapping_origin: &str,
    gazetteer: Option<&Gazetteer>,
) {
    let mut unknown_attr: BTreeMap<String, ()> = BTreeMap::new();
    let mut unknown_value: BTreeMap<(String, String), Seen> = BTreeMap::new();
    let declared = footprint
        .declared
        .iter()
        .map(|(a, v)| (a, v, Some(mapping_origin.to_string()), None));
    let friends = footprint.friends.iter().flat_map(|f| {
        f.attributes
            .iter()
            .map(|(a, v)| (a, v, Some(f.origin.file.to_string()), Some(f.origin.record)))
    });
    for (attr, value, file, record) in declared.chain(friends) {
        match priors.attribute(attr) {
            None => {
                unknown_attr.insert(attr.clone(), ());
            }
            Some((_, a)) if a.value_index(value).is_none() => {
                unknown_value
                    .entry((attr.clone(), value.clone()))
                    .or_insert(Seen {
                        file,
                        record,
                        times: 0,
                    })
                    .times += 1;
            }
            Some(_) => {}
        }
    }
    let known: Vec<&str> = priors.attributes.iter().map(|a| a.id.as_str()).collect();
    for attr in unknown_attr.keys() {
        footprint.warnings.push(
            Warning::new(format!(
                "the mapping names attribute '{attr}', which the priors do not have (they have {}); its values are ignored",
                known.join(", ")
            ))
            .in_file(mapping_origin),
        );
    }
    let places = gazetteer.and_then(|g| PlaceContext::new(priors, g));
    for ((attr, value), seen) in unknown_value.iter().take(SHOWN) {
        let more = match seen.times {
            1 => String::new(),
            n => format!(" ({} in all)", crate::reading::count(n, "time", "times")),
        };
        let place = places
            .as_ref()
            .and_then(|p| p.describe(attr, value))
            .unwrap_or_default();
        let mut w = Warning::new(format!(
            "'{value}' is not a value of {attr} in the priors (use a value id or label){place}; ignored{more}"
        ));
        if let Some(file) = &seen.file {
            w = w.in_file(file.clone());
        }
        if let Some(r) = seen.record {
            w = w.at_record(r);
        }
        footprint.warnings.push(w);
    }
    if unknown_value.len() > SHOWN {
        footprint.warnings.push(Warning::new(format!(
            "{} more ignored",
            crate::reading::count(
                unknown_value.len() - SHOWN,
                "unknown attribute value",
                "unknown attribute values"
            )
        )));
    }
}

/// The priors' location attribute and the countries its values lie in, to say where
/// a value that is not one of them is.
struct PlaceContext<'g> {
    gazetteer: &'g Gazetteer,
    attribute: String,
    countries: Vec<String>,
}

impl<'g> PlaceContext<'g> {
    fn new(priors: &Priors, gazetteer: &'g Gazetteer) -> Option<PlaceContext<'g>> {
        let lv = location_attributes(priors, gazetteer).into_iter().next()?;
        let mut countries: Vec<String> = Vec::new();
        for code in lv.codes.iter().flatten() {
            let c = code.country_code().to_string();
            if !countries.contains(&c) {
                countries.push(c);
            }
        }
        Some(PlaceContext {
            gazetteer,
            attribute: priors.attributes[lv.attribute].id.clone(),
            countries,
        })
    }

    /// ": it names a place in Nigeria, outside the countries the priors' location
    /// values cover (United States)" for a value of the location attribute naming a
    /// place the gazetteer knows elsewhere (its most populous reading).
    fn describe(&self, attr: &str, value: &str) -> Option<String> {
        if attr != self.attribute {
            return None;
        }
        let best = self
            .gazetteer
            .lookup(value)
            .into_iter()
            .max_by_key(|c| c.population)?;
        if self.countries.iter().any(|c| c == best.country) {
            return None;
        }
        let name = |code: &str| {
            self.gazetteer
                .country(code)
                .map_or_else(|| code.to_string(), |c| c.name.clone())
        };
        let listed: Vec<String> = self.countries.iter().map(|c| name(c)).collect();
        Some(format!(
            ": it names a place in {}, outside the countries the priors' location values cover ({})",
            name(best.country),
            if listed.is_empty() {
                "no country".to_string()
            } else {
                listed.join(", ")
            }
        ))
    }
}

/// Location values of a priors file that the gazetteer does not know as places (an
/// ISO 3166-1 or 3166-2 code, or a country's or region's name): they stay values, but
/// no place named in an item can point to them. Said once, naming the priors file and
/// the values.
pub fn check_location_values(footprint: &mut Footprint, priors: &Priors, gazetteer: &Gazetteer) {
    let Some(lv) = location_attributes(priors, gazetteer).into_iter().next() else {
        return;
    };
    let attr = &priors.attributes[lv.attribute];
    let unknown: Vec<String> = attr
        .values
        .iter()
        .zip(&lv.codes)
        .filter(|(_, code)| match code {
            None => true,
            Some(c) => !c.known_to(gazetteer),
        })
        .map(|(v, _)| format!("'{}'", v.id))
        .collect();
    if unknown.is_empty() {
        return;
    }
    let listed = if unknown.len() > SHOWN {
        format!(
            "{} and {} more",
            unknown[..SHOWN].join(", "),
            unknown.len() - SHOWN
        )
    } else {
        unknown.join(", ")
    };
    footprint.warnings.push(
        Warning::new(format!(
            "{} of {}'s values ({listed}) {} not a place the bundled gazetteer knows (an ISO 3166-1 or ISO 3166-2 code, or a country's or region's name): kept as values, but no place named in an item can point to them",
            unknown.len(),
            attr.id,
            if unknown.len() == 1 { "is" } else { "are" },
        ))
        .in_file(priors.origin.clone()),
    );
}
