//! Pronounceable invented names built from syllables, unique within one generator.

use std::collections::BTreeSet;

use rand::RngExt;
use rand_pcg::Pcg64;

const ONSETS: &[&str] = &[
    "b", "d", "f", "g", "h", "k", "l", "m", "n", "p", "r", "s", "t", "v", "z", "br", "dr", "gr",
    "kr", "tr", "th", "sk", "st", "vr", "fl", "gl", "sh", "ch",
];
const VOWELS: &[&str] = &[
    "a", "e", "i", "o", "u", "a", "e", "o", "ae", "ei", "ou", "ia", "y",
];
const INNER_CODAS: &[&str] = &["", "", "", "", "n", "r", "l", "s"];
const FINAL_CODAS: &[&str] = &[
    "", "", "", "n", "r", "l", "s", "th", "nd", "rn", "m", "sk", "rth", "ll", "x", "sh",
];
const COUNTRY_ENDINGS: &[&str] = &["essa", "ovar", "andel", "arune", "alis", "entia"];

fn pick<'a>(rng: &mut Pcg64, items: &[&'a str]) -> &'a str {
    items[rng.random_range(0..items.len())]
}

fn capitalise(word: &str) -> String {
    let mut chars = word.chars();
    match chars.next() {
        Some(first) => first.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// A word of `syllables` syllables, lower case.
fn raw_word(rng: &mut Pcg64, syllables: usize) -> String {
    let mut word = String::new();
    for i in 0..syllables {
        // A vowel-initial first syllable now and then.
        if i > 0 || rng.random_bool(0.8) {
            word.push_str(pick(rng, ONSETS));
        }
        word.push_str(pick(rng, VOWELS));
        if i + 1 == syllables {
            word.push_str(pick(rng, FINAL_CODAS));
        } else {
            word.push_str(pick(rng, INNER_CODAS));
        }
    }
    word
}

fn is_pleasant(word: &str) -> bool {
    let len = word.chars().count();
    if !(5..=11).contains(&len) {
        return false;
    }
    let is_vowel = |c: char| "aeiouy".contains(c);
    let chars: Vec<char> = word.chars().collect();
    let mut run_vowels = 0;
    let mut run_consonants = 0;
    for (i, &c) in chars.iter().enumerate() {
        if is_vowel(c) {
            run_vowels += 1;
            run_consonants = 0;
        } else {
            run_consonants += 1;
            run_vowels = 0;
        }
        if run_vowels > 2 || run_consonants > 3 {
            return false;
        }
        if i > 0 && chars[i - 1] == c && is_vowel(c) {
            return false;
        }
    }
    true
}

/// Hands out names that are never repeated (compared case-insensitively).
#[derive(Debug, Default)]
pub struct NameGen {
    used: BTreeSet<String>,
}

impl NameGen {
    pub fn new() -> Self {
        Self::default()
    }

    fn claim(&mut self, name: String) -> Option<String> {
        if self.used.insert(name.to_lowercase()) {
            Some(name)
        } else {
            None
        }
    }

    /// A place name of two or three syllables.
    pub fn place(&mut self, rng: &mut Pcg64) -> String {
        for attempt in 0..10_000 {
            let syllables = if rng.random_bool(0.6) { 2 } else { 3 };
            let word = raw_word(rng, syllables);
            if !is_pleasant(&word) {
                continue;
            }
            if let Some(name) = self.claim(capitalise(&word)) {
                return name;
            }
            // Many names are taken: let longer ones through.
            if attempt > 5_000 {
                let longer = raw_word(rng, 4);
                if let Some(name) = self.claim(capitalise(&longer)) {
                    return name;
                }
            }
        }
        // Syllables ran out (never for the sizes used here): number the name.
        let mut n = self.used.len();
        loop {
            if let Some(name) = self.claim(format!("Place {n}")) {
                return name;
            }
            n += 1;
        }
    }

    /// A country name: one syllable and a longer ending.
    pub fn country(&mut self, rng: &mut Pcg64) -> String {
        loop {
            let word = format!(
                "{}{}{}{}",
                pick(rng, ONSETS),
                pick(rng, VOWELS),
                pick(rng, INNER_CODAS),
                pick(rng, COUNTRY_ENDINGS)
            );
            if !is_pleasant(&word) {
                continue;
            }
            if let Some(name) = self.claim(capitalise(&word)) {
                return name;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    #[test]
    fn names_are_unique_and_pronounceable() {
        let mut rng = Pcg64::seed_from_u64(5);
        let mut names = NameGen::new();
        let mut seen = BTreeSet::new();
        for _ in 0..3_000 {
            let name = names.place(&mut rng);
            assert!(seen.insert(name.to_lowercase()), "repeated {name}");
            assert!(name.chars().next().is_some_and(char::is_uppercase));
        }
        let country = names.country(&mut rng);
        assert!(!seen.contains(&country.to_lowercase()));
    }

    #[test]
    fn unpleasant_words_are_refused() {
        assert!(!is_pleasant("aaab"));
        assert!(!is_pleasant("strkla"));
        assert!(!is_pleasant("abcd"));
        assert!(is_pleasant("dravenor"));
    }
}
