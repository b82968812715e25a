//! Demo personas who live outside the USA, so that a workshop anywhere has someone to
//! look at: an organiser in İzmir writing in Turkish and a digital-safety trainer in
//! Bogotá writing in Spanish. Invented people (any likeness to a real person is
//! chance); the places are real. Their items are written by hand, as people there
//! might name them, and none is in the demo's reference table (the fictional network
//! is American), so what a scan reads about them comes from the word lists: place
//! names, life stages and belief words. Each archive uses a layout of its own, with
//! file and field names in the person's language (layout C, neither demo layout A nor
//! B, nor any real platform's), and carries its mapping inside the folder.
//!
//! The truth is kept in demo-exports/world-manifest.json: age band, country (ISO
//! 3166-1), first-level region (ISO 3166-2) and religion.

use std::io;

use serde::Serialize;

use super::sink::ArchiveSink;

/// One hand-written persona.
pub struct AbroadSpec {
    pub slug: &'static str,
    pub name: &'static str,
    pub role: &'static str,
    /// BCP 47 tag of the language the archive is written in.
    pub language: &'static str,
    /// age band (the demo priors' value id), country, region, religion.
    pub truth: [&'static str; 4],
    /// File and field names of the layout, in the person's language.
    pub words: LayoutWords,
    /// (kind, name, YYYY-MM-DD).
    pub items: &'static [(&'static str, &'static str, &'static str)],
    pub first_names: &'static [&'static str],
    pub last_names: &'static [&'static str],
    pub friends: usize,
}

/// The names a layout C archive uses.
pub struct LayoutWords {
    pub folder: &'static str,
    pub likes: &'static str,
    pub groups: &'static str,
    pub follows: &'static str,
    pub events: &'static str,
    pub friends: &'static str,
    pub name: &'static str,
    pub date: &'static str,
    pub records: &'static str,
}

/// The two personas.
pub const ABROAD: [AbroadSpec; 2] = [
    AbroadSpec {
        slug: "organiser-izmir",
        name: "Deniz Karaca",
        role: "a women's-rights organiser in İzmir, Türkiye",
        language: "tr",
        truth: ["25-34", "TR", "TR-35", "none"],
        words: LayoutWords {
            folder: "hesap",
            likes: "begeniler.json",
            groups: "gruplar.json",
            follows: "takip_edilenler.csv",
            events: "etkinlikler.ndjson",
            friends: "arkadaslar.csv",
            name: "ad",
            date: "tarih",
            records: "kayitlar",
        },
        items: &[
            (
                "group",
                "Ege Üniversitesi Sosyoloji 2019 Mezunları",
                "2019-07-02",
            ),
            ("group", "Bornova Kadın Dayanışma Ağı", "2020-03-08"),
            ("group", "Alsancak Sabah Koşucuları", "2022-04-17"),
            ("group", "İzmir Bisiklet Derneği Gönüllüleri", "2021-09-12"),
            ("group", "Buca Mahalle Meclisi", "2023-01-21"),
            ("like", "Bornova Salı Pazarı Esnafı", "2022-06-07"),
            ("group", "İzmir Kent Konseyi Kadın Meclisi", "2021-11-25"),
            ("group", "Ege Kıyı Temizliği Gönüllüleri", "2020-08-30"),
            ("group", "Kordon Kitap Kulübü", "2024-02-10"),
            ("like", "İzmirli Fotoğrafçılar", "2018-05-19"),
            ("follow", "İzmir Yerel Haberler", "2019-10-03"),
            ("follow", "Bayraklı Belediyesi Duyurular", "2023-05-14"),
            ("follow", "Ege Sendika Bülteni", "2021-02-27"),
            ("event", "8 Mart Bornova Yürüyüşü 2025", "2025-03-08"),
            ("event", "Alsancak Kadın Hakları Paneli 2024", "2024-11-23"),
            ("event", "Berlin Gezisi 2023", "2023-08-05"),
            ("like", "Kapadokya Tatil Önerileri", "2022-12-01"),
            (
                "group",
                "İzmir'deki Selanik Göçmenleri Derneği",
                "2019-04-06",
            ),
            ("group", "Ege Kadın Sendikacılar Platformu", "2022-10-15"),
            ("like", "Feminist Organisers Network Europe", "2021-06-18"),
            ("like", "Karşıyaka Semt Pazarı", "2024-07-09"),
            ("group", "Bornova Kiracılar Dayanışması", "2025-01-12"),
            ("follow", "Dijital Güvenlik Rehberi", "2024-09-30"),
            (
                "event",
                "Gündoğdu Meydanı Emek Buluşması 2026",
                "2026-05-01",
            ),
        ],
        first_names: &[
            "Ayşe", "Mehmet", "Zeynep", "Emre", "Elif", "Burak", "Selin", "Can", "Derya", "Onur",
            "Gizem", "Kaan",
        ],
        last_names: &[
            "Yılmaz", "Demir", "Şahin", "Çelik", "Aydın", "Öztürk", "Arslan", "Doğan", "Kurt",
            "Koç",
        ],
        friends: 48,
    },
    AbroadSpec {
        slug: "trainer-bogota",
        name: "Luz Marina Ocampo",
        role: "a digital-safety trainer in Bogotá, Colombia",
        language: "es",
        truth: ["45-54", "CO", "CO-DC", "christian"],
        words: LayoutWords {
            folder: "mi_cuenta",
            likes: "me_gusta.json",
            groups: "grupos.json",
            follows: "seguidos.csv",
            events: "eventos.ndjson",
            friends: "amigos.csv",
            name: "nombre",
            date: "fecha",
            records: "registros",
        },
        items: &[
            (
                "group",
                "Promoción 1997 Colegio Distrital de Chapinero",
                "2012-05-20",
            ),
            (
                "group",
                "Egresados Comunicación Social Universidad Nacional 2002",
                "2013-02-11",
            ),
            ("group", "Corredores de Usaquén", "2021-03-14"),
            ("like", "Mercado Campesino de Teusaquillo", "2020-10-04"),
            (
                "group",
                "Junta de Acción Comunal Chapinero Alto",
                "2018-07-22",
            ),
            (
                "group",
                "Coro de la Parroquia Nuestra Señora de Lourdes",
                "2016-12-08",
            ),
            (
                "group",
                "Padres de Familia Colegio Los Pinos Bogotá",
                "2019-02-03",
            ),
            ("follow", "Noticias Locales de Bogotá", "2017-06-15"),
            ("like", "Ciclovía Bogotá Domingos", "2015-08-09"),
            (
                "group",
                "Seguridad Digital para Periodistas Colombia",
                "2020-04-27",
            ),
            ("event", "Viaje a Cartagena 2022", "2022-06-18"),
            ("like", "Consejos de viaje Lisboa", "2023-09-01"),
            ("group", "Venezolanos en Bogotá Solidaridad", "2019-11-16"),
            ("like", "Digital Safety Trainers Circle", "2021-01-25"),
            ("group", "Vecinos de La Macarena", "2022-02-19"),
            ("follow", "Alcaldía Local de Chapinero", "2021-08-30"),
            (
                "event",
                "Taller de Seguridad Digital Medellín 2024",
                "2024-05-11",
            ),
            ("event", "Feria del Libro Bogotá 2025", "2025-04-26"),
            ("like", "Biblioteca Pública Virgilio Barco", "2018-03-03"),
            ("group", "Huerta Comunitaria de Teusaquillo", "2023-04-22"),
            (
                "follow",
                "Red de Defensoras de Derechos Humanos",
                "2020-12-10",
            ),
            ("event", "Primera Comunión de Sofía 2024", "2024-10-12"),
        ],
        first_names: &[
            "Andrés",
            "Camila",
            "Juan Pablo",
            "Valentina",
            "Diego",
            "Natalia",
            "Carlos",
            "Daniela",
            "Felipe",
            "Paola",
            "Sebastián",
            "Lina",
        ],
        last_names: &[
            "Rodríguez",
            "Gómez",
            "Martínez",
            "Rincón",
            "Vargas",
            "Castaño",
            "Morales",
            "Restrepo",
            "Quintero",
            "Salazar",
        ],
        friends: 63,
    },
];

/// What the generator wrote for one of these personas.
#[derive(Debug, Clone, PartialEq, Serialize, serde::Deserialize)]
pub struct AbroadManifest {
    pub slug: String,
    pub name: String,
    pub role: String,
    pub language: String,
    pub layout: String,
    /// Archive folder relative to the exports folder (its mapping is inside).
    pub archive: String,
    pub items: usize,
    pub friends: usize,
    pub age_band: String,
    /// ISO 3166-1 alpha-2.
    pub country: String,
    /// ISO 3166-2.
    pub region: String,
    pub religion: String,
}

/// The mapping of a layout C archive, with its names.
pub fn mapping(spec: &AbroadSpec) -> String {
    let w = &spec.words;
    let json = |kind: &str, file: &str| {
        format!(
            "[[source]]\nkind = \"{kind}\"\nfiles = [\"{}/{file}\"]\nrecords = \"$.{}[*]\"\nname = \"$.{}\"\ndate = \"$.{}\"\n\n",
            w.folder, w.records, w.name, w.date
        )
    };
    let mut out = format!(
        "# Mapping for an invented archive layout (layout C, written by `telltale synth demo`):\n\
         # file and field names in the person's language ({}). Not a real platform's layout.\n\
         format = 1\nlabel = \"demo layout C ({})\"\n\n",
        spec.language, spec.language
    );
    out.push_str(&json("like", w.likes));
    out.push_str(&json("group", w.groups));
    out.push_str(&format!(
        "[[source]]\nkind = \"follow\"\nfiles = [\"{}/{}\"]\nname = \"{}\"\ndate = \"{}\"\n\n",
        w.folder, w.follows, w.name, w.date
    ));
    out.push_str(&format!(
        "[[source]]\nkind = \"event\"\nfiles = [\"{}/{}\"]\nname = \"$.{}\"\ndate = \"$.{}\"\n\n",
        w.folder, w.events, w.name, w.date
    ));
    out.push_str(&format!(
        "[[source]]\nkind = \"friend\"\nfiles = [\"{}/{}\"]\nname = \"{}\"\ndate = \"{}\"\n",
        w.folder, w.friends, w.name, w.date
    ));
    out
}

/// Write one persona's archive into `sink` (its mapping inside, as
/// telltale-mapping.toml) and say what was written.
pub fn write(spec: &AbroadSpec, sink: &mut dyn ArchiveSink) -> io::Result<AbroadManifest> {
    let w = &spec.words;
    let of = |kind: &'static str| spec.items.iter().filter(move |(k, _, _)| *k == kind);
    let record = |n: &str, d: &str| -> serde_json::Value {
        let mut m = serde_json::Map::new();
        m.insert(w.name.into(), n.into());
        m.insert(w.date.into(), d.into());
        serde_json::Value::Object(m)
    };
    let records = |kind: &'static str| -> serde_json::Value {
        let list: Vec<serde_json::Value> = of(kind).map(|(_, n, d)| record(n, d)).collect();
        let mut m = serde_json::Map::new();
        m.insert(w.records.into(), list.into());
        serde_json::Value::Object(m)
    };
    let pretty = |v: serde_json::Value| -> io::Result<Vec<u8>> {
        let mut b = serde_json::to_vec_pretty(&v).map_err(io::Error::other)?;
        b.push(b'\n');
        Ok(b)
    };
    let path = |file: &str| format!("{}/{file}", w.folder);
    sink.file(&path(w.likes), &pretty(records("like"))?)?;
    sink.file(&path(w.groups), &pretty(records("group"))?)?;
    let mut follows = format!("{},{}\n", w.name, w.date);
    for (_, n, d) in of("follow") {
        follows.push_str(&format!("\"{}\",{d}\n", n.replace('"', "\"\"")));
    }
    sink.file(&path(w.follows), follows.as_bytes())?;
    let mut events = String::new();
    for (_, n, d) in of("event") {
        events.push_str(&record(n, d).to_string());
        events.push('\n');
    }
    sink.file(&path(w.events), events.as_bytes())?;
    // Friends: invented names, each first and last name paired in turn; no attribute
    // of theirs is public.
    let mut friends = format!("{},{}\n", w.name, w.date);
    let (nf, nl) = (spec.first_names.len(), spec.last_names.len());
    for i in 0..spec.friends {
        let first = spec.first_names[i % nf];
        let last = spec.last_names[(i / nf + i * 3) % nl];
        let year = 2012 + (i * 7) % 14;
        let month = 1 + (i * 5) % 12;
        friends.push_str(&format!("\"{first} {last}\",{year}-{month:02}-15\n"));
    }
    sink.file(&path(w.friends), friends.as_bytes())?;
    sink.file("telltale-mapping.toml", mapping(spec).as_bytes())?;
    sink.file(
        "README.txt",
        format!(
            "Invented archive (demo layout C), made by `telltale synth demo` for demonstrations.\n\
             Not a real person or a real platform's export.\n\n\
             Persona: {}, {}.\n\
             Items are written in the person's own language ({}); none is in the demo's\n\
             reference table, so a scan reads them with the word lists. Scan with the home\n\
             place read at three levels for the whole world:\n\n\
             \x20 telltale scan demo-exports/{} --home-levels\n",
            spec.name, spec.role, spec.language, spec.slug
        )
        .as_bytes(),
    )?;
    Ok(AbroadManifest {
        slug: spec.slug.into(),
        name: spec.name.into(),
        role: spec.role.into(),
        language: spec.language.into(),
        layout: "C".into(),
        archive: spec.slug.into(),
        items: spec.items.len(),
        friends: spec.friends,
        age_band: spec.truth[0].into(),
        country: spec.truth[1].into(),
        region: spec.truth[2].into(),
        religion: spec.truth[3].into(),
    })
}
