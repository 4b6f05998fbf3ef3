#!/usr/bin/env python3
"""Generate the demo data of the invented shop Tillwick Goods (English and Spanish).

The shop sells home and kitchen goods from one catalogue in two markets. The generator
builds that catalogue from the bilingual concept table in demo_lexicon.py (items,
materials, colours, sizes, actions, faults), gives each item its own profile of likely
materials, colours, uses, actions and faults, and then writes, for each language
separately, product listings, order notes, support messages and reviews. The two
corpora share the concept distribution and the catalogue (brand names and model codes
such as TW-4410, sizes such as 500ml), but not their documents: each language draws its
own documents with its own templates, word order, agreement, synonyms and popularity, so
no line is a translation of another. The text is deliberately messy: typos, casing,
dropped accents, punctuation, prices, dates and order numbers.

Outputs (into --out, gzip written with mtime 0, so the same seed gives the same bytes):
  tillwick-en.txt.gz, tillwick-es.txt.gz   the corpora, one document per line
  demo-seed.pairs, demo-test.pairs          English->Spanish word lists, disjoint sources
  tiny-en.txt                               a small vector table (rows dim header)

Usage: make-demo.py [--seed N] [--out DIR] [--docs N]
"""

import argparse
import gzip
import io
import math
import os
import random
import re
import sys
import unicodedata

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import demo_lexicon as lex  # noqa: E402

# ---------------------------------------------------------------------------------------
# Word forms


def en_plural(w):
    if re.search(r"(s|x|z|ch|sh)$", w):
        return w + "es"
    if re.search(r"[^aeiou]y$", w):
        return w[:-1] + "ies"
    return w + "s"


STRIP_ACCENT = str.maketrans("áéíóú", "aeiou")
ADD_ACCENT = {"a": "á", "e": "é", "i": "í", "o": "ó", "u": "ú"}


def es_plural(w):
    if w[-1] in "aeiouáéó":
        return w + "s"
    if w[-1] in "íú":
        return w + "es"
    if w.endswith("z"):
        return w[:-1] + "ces"
    m = re.search(r"[áéíóú]([ns])$", w)
    if m:
        return w.translate(STRIP_ACCENT) + "es"
    if w.endswith("s") and not re.search(r"[aeiouáéíóú].*[aeiouáéíóú]", w):
        return w + "es"
    if w.endswith("s") or w.endswith("x"):
        return w
    return w + "es"


def es_adj_forms(base):
    """(masc sg, fem sg, masc pl, fem pl) of a Spanish adjective."""
    if base.endswith("*"):
        w = base[:-1]
        return (w, w, es_plural(w), es_plural(w))
    if base.endswith("o"):
        s = base[:-1]
        return (base, s + "a", s + "os", s + "as")
    if re.search(r"[áéíóú]n$", base) or base.endswith("or"):
        f = base.translate(STRIP_ACCENT) + "a"
        return (base, f, es_plural(base), f + "s")
    return (base, base, es_plural(base), es_plural(base))


def en_verb_forms(base, past=None):
    if re.search(r"(s|x|z|ch|sh)$", base):
        p3 = base + "es"
    elif re.search(r"[^aeiou]y$", base):
        p3 = base[:-1] + "ies"
    else:
        p3 = base + "s"
    if past is None:
        if base.endswith("e"):
            past = base + "d"
        elif re.search(r"[^aeiou]y$", base):
            past = base[:-1] + "ied"
        else:
            past = base + "ed"
    return {"base": base, "p3": p3, "past": past}


def es_verb_forms(inf, overrides):
    stem, kind = inf[:-2], inf[-2:]
    f = {"inf": inf}
    if kind == "ar":
        soft = stem
        if stem.endswith("c"):
            soft = stem[:-1] + "qu"
        elif stem.endswith("g"):
            soft = stem + "u"
        elif stem.endswith("z"):
            soft = stem[:-1] + "c"
        f.update(p3=stem + "a", p1=stem + "o", pret1=soft + "é", pret3=stem + "ó",
                 part=stem + "ado", imp=soft + "e", p1pl=stem + "amos")
    else:
        f.update(p3=stem + "e", p1=stem + "o", pret1=stem + "í", pret3=stem + "ió",
                 part=stem + "ido", imp=stem + "a",
                 p1pl=stem + ("emos" if kind == "er" else "imos"))
    f.update(overrides)
    return f


# ---------------------------------------------------------------------------------------
# The concept table


class Concept:
    def __init__(self, kind, key):
        self.kind, self.key = kind, key
        self.en = []   # list of dicts of forms, first is the main word
        self.es = []
        self.cat = None


def split_syn(text):
    return [t.strip() for t in text.split(",") if t.strip()]


def parse_nouns(kind, block, cat=None):
    out = []
    for line in block.strip().splitlines():
        line = line.strip()
        if not line:
            continue
        left, right = line.split("=")
        c = Concept(kind, None)
        c.cat = cat
        for e in split_syn(left):
            sg, _, pl = e.partition("/")
            c.en.append({"sg": sg, "pl": (pl or en_plural(sg)) if pl != "-" else None})
        for s in split_syn(right):
            word, g = s.rsplit(" ", 1)
            sg, _, pl = word.partition("/")
            c.es.append({"sg": sg, "pl": (pl or es_plural(sg)) if pl != "-" else None,
                         "g": g[0], "elA": g == "fA"})
        if c.en[0]["pl"] is None or c.es[0]["pl"] is None:
            c.countable = False
        else:
            c.countable = True
        c.key = c.en[0]["sg"]
        out.append(c)
    return out


def parse_adjs(kind, block):
    out = []
    for line in block.strip().splitlines():
        left, right = line.split("=")
        c = Concept(kind, None)
        c.en = [{"w": w} for w in split_syn(left)]
        c.es = [{"forms": es_adj_forms(w), "base": w.rstrip("*")} for w in split_syn(right)]
        c.key = c.en[0]["w"]
        out.append(c)
    return out


def parse_materials(block):
    out = []
    for line in block.strip().splitlines():
        left, right = line.split("=")
        c = Concept("material", None)
        c.en = [{"w": w} for w in split_syn(left)]
        c.es = [{"w": w} for w in split_syn(right)]
        c.key = c.en[0]["w"]
        out.append(c)
    return out


def parse_verbs(block):
    out = []
    for line in block.strip().splitlines():
        left, right = line.split("=", 1)
        en = left.split()
        parts = right.split()
        overrides = dict(p.split("=") for p in parts[1:])
        c = Concept("verb", en[0])
        c.en = [en_verb_forms(en[0], en[1] if len(en) > 1 else None)]
        c.es = [es_verb_forms(parts[0], overrides)]
        out.append(c)
    return out


def parse_list(kind, text):
    out = []
    for pair in text.split(","):
        en, es = pair.split()
        c = Concept(kind, en)
        c.en = [{"w": en}]
        c.es = [{"w": es}]
        out.append(c)
    return out


class Lexicon:
    def __init__(self):
        self.items = []
        for cat, block in lex.ITEMS.items():
            self.items += parse_nouns("item", block, cat)
        self.nouns = {}
        for cat, block in lex.NOUNS.items():
            for c in parse_nouns(cat, block, cat):
                self.nouns[c.key] = c
        self.materials = {c.key: c for c in parse_materials(lex.MATERIALS)}
        self.colours = {c.key: c for c in parse_adjs("colour", lex.COLOURS)}
        self.adjs = {c.key: c for c in parse_adjs("adj", lex.ADJECTIVES)}
        self.faults = {c.key: c for c in parse_adjs("faulty", lex.FAULTS)}
        self.verbs = {c.key: c for c in parse_verbs(lex.VERBS)}
        self.days = parse_list("day", lex.DAYS)
        self.months = parse_list("month", lex.MONTHS)
        self.numbers = parse_list("number", lex.NUMBERS)
        self.item_by_key = {c.key: c for c in self.items}

    def all_concepts(self):
        return (self.items + list(self.nouns.values()) + list(self.materials.values())
                + list(self.colours.values()) + list(self.adjs.values())
                + list(self.faults.values()) + list(self.verbs.values())
                + self.days + self.months + self.numbers)

    def resolve(self, words, tables, what, cat):
        """Concepts named by their English words (any synonym) in the given tables."""
        out = []
        for w in words.split():
            found = None
            for table in tables:
                for c in table.values():
                    if any(w in (e.get("w"), e.get("sg"), e.get("base")) for e in c.en):
                        found = c
                        break
                if found:
                    break
            if found:
                out.append(found)
            else:
                self.unknown.append("%s %s: %s" % (cat, what, w))
        return out


# ---------------------------------------------------------------------------------------
# Catalogue: items with their profiles, products with codes, sizes and prices


def zipf_weights(n, s, rng):
    w = [1.0 / (i + 1) ** s for i in range(n)]
    order = list(range(n))
    rng.shuffle(order)
    return [w[order[i]] for i in range(n)]


class Profile:
    """An item's own likely attributes: lists of concepts with weights."""

    def __init__(self, rng, choices, k):
        k = min(k, len(choices))
        picked = rng.sample(choices, k) if k else []
        self.concepts = picked
        self.weights = [1.0 / (i + 1) ** 0.8 for i in range(k)]

    def draw(self, rng):
        if not self.concepts:
            return None
        return rng.choices(self.concepts, self.weights)[0]


def build_catalogue(L, rng):
    L.unknown = []
    items = L.item_by_key
    places = {k: c for k, c in L.nouns.items() if c.kind == "place"}
    for c in L.items:
        p = lex.PROFILES[c.cat]
        cat = c.cat
        c.prof = {
            "material": Profile(rng, L.resolve(p["materials"], [L.materials], "material", cat),
                                4),
            "colour": Profile(rng, L.resolve(p["colours"], [L.colours], "colour", cat), 5),
            "adj": Profile(rng, L.resolve(p["adjs"], [L.adjs], "adj", cat), 6),
            "fault": Profile(rng, L.resolve(p["faults"], [L.faults, L.adjs], "fault", cat), 4),
            "part": Profile(rng, L.resolve(p["parts"], [L.nouns, items], "part", cat), 3),
            "use": Profile(rng, L.resolve(p["uses"], [L.nouns, items], "use", cat), 4),
            "verb": Profile(rng, L.resolve(p["verbs"], [L.verbs], "verb", cat), 4),
            "place": Profile(rng, L.resolve(p["places"], [places], "place", cat), 2),
            "appliance": Profile(rng, L.resolve(p["appliances"], [items], "appliance", cat),
                                 2),
        }
        mates = [o for o in L.items if o.cat == c.cat and o is not c]
        c.prof["mate"] = Profile(rng, mates, 3)
    if L.unknown:
        seen = sorted(set(L.unknown))
        print("make-demo: profile words missing from the lexicon: " + "; ".join(seen),
              file=sys.stderr)
    products = []
    used_codes = set()
    for c in L.items:
        n = rng.randint(2, 7)
        for _ in range(n):
            brand, prefix = rng.choice(lex.BRANDS)
            while True:
                code = "%s-%d" % (prefix, rng.randint(1000, 9899))
                if code not in used_codes:
                    used_codes.add(code)
                    break
            prod = {
                "item": c, "brand": brand, "code": code,
                "material": c.prof["material"].draw(rng),
                "colour": c.prof["colour"].draw(rng),
                "adj": c.prof["adj"].draw(rng),
                "size": make_size(c, rng),
                "price": round(rng.lognormvariate(math.log(25), 0.8), 0) + 0.99,
                "pack": rng.choice([1, 1, 1, 1, 2, 3, 4, 6]) if c.countable else 1,
            }
            products.append(prod)
    return products


# Items sold by what they hold (500ml, 1.5L); the others by a length (30cm) or, for flat
# and large goods, by two lengths (140x200cm).
VESSELS = {"pot", "saucepan", "casserole", "wok", "kettle", "steamer", "roaster", "bowl",
           "mug", "cup", "glass", "goblet", "jug", "teapot", "coffeepot", "ramekin", "carafe",
           "jar", "tin", "box", "basket", "container", "bottle", "flask", "lunchbox", "bucket",
           "bin", "dispenser", "planter", "blender", "fryer", "juicer", "humidifier", "mould",
           "colander", "eggcup", "tray", "platter"}
FLAT = {"textiles", "furniture", "garden"}


def make_size(item, rng):
    if item.key in VESSELS:
        ml = rng.choice([150, 200, 250, 300, 350, 400, 500, 750, 1000, 1500, 2000, 3000])
        return ("ml", ml)
    if item.cat in FLAT:
        a, b = rng.choice([40, 50, 60, 80, 90, 120, 140, 160]), rng.choice([40, 60, 90, 200])
        return ("cm2", (a, b))
    return ("cm", rng.choice([10, 12, 15, 18, 20, 24, 26, 28, 30, 32, 40, 45]))


# ---------------------------------------------------------------------------------------
# Language realisers


class Lang:
    """Per-language choices: synonyms, popularity and a random stream of its own."""

    def __init__(self, name, L, products, seed):
        self.name = name
        self.rng = random.Random("%s-%s" % (seed, name))
        self.L = L
        # Each market has its own taste: the same products, other popularity.
        base = zipf_weights(len(products), 0.9, random.Random("%s-pop" % seed))
        self.pop = [b * self.rng.lognormvariate(0, 0.5) for b in base]
        self.products = products
        self.syn = {}

    def pick(self, options, concept):
        """Choose a synonym; the first is the most used, each language its own mix."""
        if len(options) == 1:
            return options[0]
        key = id(concept)
        if key not in self.syn:
            self.syn[key] = [1.0] + [self.rng.uniform(0.15, 0.6) for _ in options[1:]]
        return self.rng.choices(options, self.syn[key])[0]

    def product(self):
        return self.rng.choices(self.products, self.pop)[0]

    def chance(self, p):
        return self.rng.random() < p

    def one(self, seq):
        return self.rng.choice(seq)


class English(Lang):
    def noun(self, c, plural=False):
        form = self.pick(c.en, c)
        if plural and form["pl"]:
            return form["pl"]
        return form["sg"]

    def adj(self, c):
        return self.pick(c.en, c)["w"]

    def material(self, c):
        return self.pick(c.en, c)["w"]

    def np(self, item, det="the", plural=False, colour=None, material=None, adj=None):
        words = []
        if adj:
            words.append(self.adj(adj))
        if colour:
            words.append(self.adj(colour))
        if material:
            words.append(self.material(material))
        words.append(self.noun(item, plural))
        head = " ".join(words)
        if det == "a":
            if plural or not item.countable:
                return ("some " + head) if self.chance(0.3) else head
            return ("an " if head[0] in "aeiou" else "a ") + head
        if det == "this":
            return ("these " if plural else "this ") + head
        if det:
            return det + " " + head
        return head

    def pron(self, plural):
        return "them" if plural else "it"

    def be(self, plural, past=False):
        if past:
            return "were" if plural else "was"
        return "are" if plural else "is"


class Spanish(Lang):
    def form(self, c):
        return self.pick(c.es, c)

    def noun(self, f, plural=False):
        if plural and f["pl"]:
            return f["pl"]
        return f["sg"]

    def agree(self, c, f, plural):
        """The form of adjective concept c agreeing with noun form f."""
        forms = self.pick(c.es, c)["forms"]
        fem = f["g"] == "f"
        return forms[(2 if plural else 0) + (1 if fem else 0)]

    def det(self, kind, f, plural):
        fem = f["g"] == "f"
        if kind == "the":
            if plural:
                return "las" if fem else "los"
            return "el" if (not fem or f.get("elA")) else "la"
        if kind == "a":
            if plural:
                return "unas" if fem else "unos"
            return "un" if (not fem or f.get("elA")) else "una"
        if kind == "this":
            if plural:
                return "estas" if fem else "estos"
            return "esta" if fem else "este"
        if kind == "my":
            return "mis" if plural else "mi"
        if kind == "your":
            return "sus" if plural else "su"
        return kind

    def np(self, item, det="the", plural=False, colour=None, material=None, adj=None,
           f=None):
        f = f or self.form(item)
        if not f["pl"]:
            plural = False
        words = [self.noun(f, plural)]
        post = []
        if material:
            post.append("de " + self.pick(material.es, material)["w"])
        if colour:
            post.append(self.agree(colour, f, plural))
        if adj:
            post.append(self.agree(adj, f, plural))
        if len(post) > 1 and self.chance(0.3):
            post[0], post[1] = post[1], post[0]
        words += post
        head = " ".join(words)
        if det:
            d = self.det(det, f, plural)
            if det == "a" and plural and self.chance(0.5):
                return head
            return d + " " + head
        return head

    def pron(self, f, plural):
        fem = f["g"] == "f"
        return ("las" if fem else "los") if plural else ("la" if fem else "lo")


# ---------------------------------------------------------------------------------------
# Numbers, money, dates, sizes: each market writes them its own way

EN_MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August",
             "September", "October", "November", "December"]


def rand_date(rng):
    y = rng.choice([2025, 2026])
    m = rng.randint(1, 12)
    d = rng.randint(1, 28)
    return y, m, d


def en_date(lg):
    y, m, d = rand_date(lg.rng)
    style = lg.rng.random()
    if style < 0.35:
        return "%d/%d/%d" % (m, d, y)
    if style < 0.55:
        return "%02d/%02d/%d" % (m, d, y)
    if style < 0.8:
        return "%s %d" % (EN_MONTHS[m - 1][:3] if lg.chance(0.5) else EN_MONTHS[m - 1], d)
    if style < 0.9:
        return "%d-%02d-%02d" % (y, m, d)
    return lg.L.days[lg.rng.randrange(7)].en[0]["w"].capitalize()


def es_date(lg):
    y, m, d = rand_date(lg.rng)
    style = lg.rng.random()
    month = lg.L.months[m - 1].es[0]["w"]
    if style < 0.35:
        return "%d/%d/%d" % (d, m, y)
    if style < 0.55:
        return "%02d/%02d/%d" % (d, m, y)
    if style < 0.8:
        return "%d de %s" % (d, month)
    if style < 0.9:
        return "%d-%02d-%02d" % (y, m, d)
    return "el " + lg.L.days[lg.rng.randrange(7)].es[0]["w"]


def en_price(lg, p):
    s = lg.rng.random()
    if s < 0.6:
        return "$%.2f" % p
    if s < 0.8:
        return "%.2f USD" % p
    if s < 0.9:
        return "$%d" % round(p)
    return "US$ %.2f" % p


def es_price(lg, p):
    eur = math.floor(p * 0.93) + lg.one([0.95, 0.99, 0.5, 0.0])
    txt = ("%.2f" % eur).replace(".", ",")
    s = lg.rng.random()
    if s < 0.5:
        return txt + " €"
    if s < 0.7:
        return txt + "€"
    if s < 0.85:
        return "€" + txt
    return txt.split(",")[0] + " euros"


def en_size(lg, size):
    kind, v = size
    if kind == "ml":
        if v >= 1000 and lg.chance(0.6):
            return "%gL" % (v / 1000) if lg.chance(0.5) else "%g l" % (v / 1000)
        if lg.chance(0.25):
            return "%d oz" % round(v / 29.57)
        return lg.one(["%dml", "%d ml", "%dmL"]) % v
    if kind == "cm2":
        a, b = v
        if lg.chance(0.3):
            return "%d x %d in" % (round(a / 2.54), round(b / 2.54))
        return lg.one(["%dx%dcm", "%d x %d cm", "%dx%d cm"]) % (a, b)
    if lg.chance(0.3):
        return lg.one(['%d"', "%d in", "%d-inch"]) % round(v / 2.54)
    return lg.one(["%dcm", "%d cm"]) % v


def es_size(lg, size):
    kind, v = size
    if kind == "ml":
        if v >= 1000 and lg.chance(0.6):
            return ("%g" % (v / 1000)).replace(".", ",") + lg.one(["L", " l", " litros"])
        if lg.chance(0.1):
            return "%d cl" % (v // 10)
        return lg.one(["%dml", "%d ml", "%d mL"]) % v
    if kind == "cm2":
        a, b = v
        return lg.one(["%dx%dcm", "%d x %d cm", "%dx%d cm", "%d×%d cm"]) % (a, b)
    return lg.one(["%dcm", "%d cm", "%d centímetros"]) % v


def code_variant(lg, code):
    r = lg.rng.random()
    if r < 0.8:
        return code
    if r < 0.88:
        return code.lower()
    if r < 0.95:
        return code.replace("-", "")
    return code.replace("-", " ")


def order_no(lg):
    n = lg.rng.randint(10000, 99999)
    if lg.name == "en":
        return lg.one(["#%d", "#%d", "no. %d", "%d", "TG%d"]) % n
    return lg.one(["n.º %d", "nº %d", "nº%d", "%d", "#%d", "TG%d"]) % n


# ---------------------------------------------------------------------------------------
# English documents
#
# Each document picks a product, then fills templates whose slots come from the item's
# profile. A template is used only when every slot it names has a value.

# Adjectives that describe a state or a judgement rather than the product: kept out of
# product titles.
NOT_IN_TITLES = {"easy", "useful", "perfect", "good", "bad", "hot", "cold", "dirty", "clean",
                 "wet", "dry", "empty", "full", "excellent", "practical", "fast", "slow",
                 "safe", "noisy", "fragile", "flimsy", "ugly", "old", "cheap", "expensive"}

HAND_VERBS = {"wash", "dry", "rinse", "sew", "polish", "sharpen", "scrub", "fold", "iron"}
CARE_VERBS = HAND_VERBS | {"clean", "soak", "empty", "store"}

# Uses written in the plural ("for books and toys"); the others are mass nouns.
USE_PLURAL = {"egg", "biscuit", "vegetable", "herb", "spice", "flower", "plant", "book", "toy",
              "shoe", "cake", "floor", "window", "wall", "door", "shelf", "bed", "sofa",
              "chair", "seed"}


def use_noun(lg, c, f=None):
    """The word for a use: plural for countable things, singular for mass nouns."""
    if c is None:
        return None
    if f is not None:
        return lg.noun(f, plural=c.key in USE_PLURAL)
    return lg.noun(c, plural=c.key in USE_PLURAL)


SLOT_NAMES = {}


def fill(lg, templates, slots):
    """Pick one template whose slots are all present and fill it."""
    for t in templates:
        if t not in SLOT_NAMES:
            SLOT_NAMES[t] = re.findall(r"\{(\w+)\}", t)
    usable = [t for t in templates if all(slots.get(k) for k in SLOT_NAMES[t])]
    if not usable:
        return ""
    return lg.one(usable).format(**slots)


def cap(s):
    return s[:1].upper() + s[1:]


def two(lg, profile):
    """Two different concepts from a profile, or (x, None)."""
    a = profile.draw(lg.rng)
    for _ in range(4):
        b = profile.draw(lg.rng)
        if b is not a:
            return a, b
    return a, None


def en_slots(lg, p):
    """Slot values for an English document about product p."""
    it = p["item"]
    pr = it.prof
    plural = p["pack"] > 1
    u1, u2 = two(lg, pr["use"])
    a1, a2 = two(lg, pr["adj"])
    v1, v2 = two(lg, pr["verb"])
    c1, c2 = two(lg, pr["colour"])
    mate = pr["mate"].draw(lg.rng)
    part = pr["part"].draw(lg.rng)
    fault = pr["fault"].draw(lg.rng)
    place = pr["place"].draw(lg.rng)
    appl = pr["appliance"].draw(lg.rng)
    # Mostly the product's own material, so a listing does not contradict itself.
    mat = p["material"] if lg.chance(0.8) else pr["material"].draw(lg.rng)
    s = {
        "item": lg.noun(it, plural), "items": lg.noun(it, True), "one_item": lg.noun(it),
        "pron": lg.pron(plural), "Pron": "They" if plural else "It",
        "be": lg.be(plural), "was": lg.be(plural, past=True),
        "use1": use_noun(lg, u1), "use2": use_noun(lg, u2),
        "adj1": a1 and lg.adj(a1), "adj2": a2 and lg.adj(a2),
        "verb1": v1 and v1.en[0]["base"], "verb2": v2 and v2.en[0]["base"],
        "hand_verb": v1 and v1.key in HAND_VERBS and cap(v1.en[0]["base"]),
        "care_verb": v1 and v1.key in CARE_VERBS and v1.en[0]["base"],
        "col1": c1 and lg.adj(c1), "col2": c2 and lg.adj(c2),
        "mate": mate and lg.noun(mate), "mates": mate and lg.noun(mate, True),
        "part": part and lg.noun(part), "fault": fault and lg.adj(fault),
        "place": place and lg.noun(place), "appl": appl and lg.noun(appl),
        "mat": mat and lg.material(mat), "size": en_size(lg, p["size"]),
        "capacity": p["size"][0] == "ml" and en_size(lg, p["size"]),
        "dims": p["size"][0] != "ml" and en_size(lg, p["size"]),
        "price": en_price(lg, p["price"]), "sale": en_price(lg, p["price"] * 0.8),
        "date": en_date(lg), "order": order_no(lg), "code": code_variant(lg, p["code"]),
        "n": str(lg.rng.randint(2, 5)),
        "day": lg.L.days[lg.rng.randrange(7)].en[0]["w"].capitalize(),
    }
    return s


EN_LISTING = [
    "Perfect for {use1} and {use2}.", "Great for {use1} or {use2}.", "Ideal for {use1}.",
    "Made from {mat}.", "Made of {adj1} {mat}.", "Solid {mat} {part}.",
    "{appl_cap} safe.", "Safe in the {appl}.", "Not suitable for the {appl}.",
    "Easy to {verb1}.", "Simple to {verb1} and {verb2}.", "{hand_verb} by hand.",
    "Easy to {care_verb} after use.",
    "Looks great in any {place}.", "A must for the {place}.", "Brings warmth to your {place}.",
    "{adj1_cap} and {adj2}.", "{adj1_cap}, {adj2} and built to last.", "Really {adj1}.",
    "{Pron} {be} {adj1} and {adj2}.",
    "{adj1_cap} {part}.", "With a {adj1} {part}.", "The {part} is {adj1}.",
    "Pairs well with our {mates}.", "Matches the {mate}.", "Try it with a {mate}.",
    "Also available in {col1}.", "Comes in {col1} and {col2}.",
    "Dimensions: {dims}.", "Size: {size}.", "Capacity: {capacity}.",
    "{n}-year warranty.", "Ships in {n} days.",
]


def en_listing(lg):
    p = lg.product()
    it = p["item"]
    s = en_slots(lg, p)
    s["appl_cap"] = s["appl"] and cap(s["appl"])
    s["adj1_cap"] = s["adj1"] and cap(s["adj1"])
    adj = p["adj"] if p["adj"] and p["adj"].key not in NOT_IN_TITLES else None
    title = lg.np(it, det=None, plural=p["pack"] > 1, material=p["material"],
                  adj=adj if lg.chance(0.5) else None)
    title = " ".join([p["brand"], title.title() if lg.chance(0.7) else title, s["code"]])
    bits = [title]
    if p["colour"]:
        bits.append(cap(lg.adj(p["colour"])))
    bits.append(s["size"])
    if p["pack"] > 1:
        bits.append(lg.one(["set of %d", "pack of %d", "%d-pack", "%d pcs"]) % p["pack"])
    head = lg.one([" - ", ", ", " | "]).join(bits)
    if lg.chance(0.08):
        head = head.upper()
    sents = []
    for _ in range(lg.rng.randint(2, 5)):
        sent = fill(lg, EN_LISTING, s)
        if sent not in sents:
            sents.append(sent)
        s = dict(s, **{k: v for k, v in en_slots(lg, p).items() if k not in ("price", "sale")})
        s["appl_cap"] = s["appl"] and cap(s["appl"])
        s["adj1_cap"] = s["adj1"] and cap(s["adj1"])
    if lg.chance(0.6):
        sents.append(fill(lg, ["Only {price}.", "Now {price}.", "Price: {price}.", "{price}",
                               "Was {price}, now {sale}."], s))
    return head + ". " + " ".join(sents)


EN_SUPPORT_PROBLEM = [
    "I ordered {np_a} ({code}) on {date} and it arrived {fault}.",
    "I bought {np_a} ({code}) on {date} but {pron} came {fault}.",
    "Got {np_a}, model {code}, delivered {date}, and {pron_subj} {be} {fault}.",
    "The {part} on {np_the} I received is {fault}.",
    "The {part} of {np_the} is {fault} after one {period}.",
    "{Np_the} arrived with the {part} {fault}.",
    "There is a {defect} on {np_the} from order {order}.",
    "My {item} has a {defect} near the {part}.",
    "Found a {defect} in {np_the} when I opened the box.",
    "Still waiting for order {order}, it was due on {date}.",
    "My order {order} has not arrived yet. Tracking says {date}.",
    "Order {order} shows delivered on {date} but nothing came. It had {np_a} in it.",
    "How do I {verb1} {np_the}?", "How do I {verb1} {np_the}? Can {pron_subj} go in the {appl}?",
    "Is {np_the} safe in the {appl}?", "Can I {verb1} {np_the} in the {appl}?",
    "The colour of {np_the} does not match the photo, it looks more {col1}.",
    "I wanted {np_the} in {col1} but got {col2}.",
    "Can I return {np_the}? {Pron} {be} too {adj1} for my {place}.",
    "I need {np_the} in a bigger size than {size}.",
]

EN_SUPPORT_CLOSE = [
    "Could you send a replacement?", "I would like a refund please.", "Can I get a new one?",
    "Please advise.", "Thanks!", "Thank you.", "What can I do?", "Can you help?",
    "I want to return {pron}.", "Please send a new {part}.",
    "I'd like to exchange {pron} for a {col2} one.", "",
]


def en_support(lg):
    p = lg.product()
    it = p["item"]
    s = en_slots(lg, p)
    plural = p["pack"] > 1 and lg.chance(0.5)
    s["pron"] = lg.pron(plural)
    s["pron_subj"] = "they" if plural else "it"
    s["Pron"] = "They" if plural else "It"
    s["be"] = lg.be(plural)
    s["item"] = lg.noun(it, plural)
    s["np_a"] = lg.np(it, det="a", plural=plural,
                      colour=p["colour"] if lg.chance(0.5) else None,
                      material=p["material"] if lg.chance(0.5) else None)
    s["np_the"] = lg.np(it, det="the", plural=plural,
                        material=p["material"] if lg.chance(0.3) else None)
    s["Np_the"] = cap(s["np_the"])
    s["period"] = lg.one(["week", "day", "month", "wash", "use"])
    s["defect"] = lg.noun(lg.one([lg.L.nouns[k] for k in (
        "crack", "scratch", "dent", "stain", "leak", "hole", "smell", "noise", "mark")]))
    greet = lg.one(["Hi,", "Hello,", "Hi there,", "Hello team,", "Good morning,", "", "Hey,",
                    "Dear Tillwick,"])
    out = [greet, fill(lg, EN_SUPPORT_PROBLEM, s), fill(lg, EN_SUPPORT_CLOSE, s)]
    if lg.chance(0.3):
        out.append(lg.one(["Order %s." % s["order"], "Order number %s" % order_no(lg),
                           "Sent from my phone", "Regards, %s" % lg.one(
                               ["Sam", "J.", "Alex", "Robin", "K", "Jo", "Lee"])]))
    return " ".join(x for x in out if x)


EN_NOTE = [
    "Please leave the parcel at the {spot}.", "Leave at the {spot} if nobody is home.",
    "If out, leave with the {neighbour}.", "Please ring twice, or leave by the {spot}.",
    "Gift for my {person}, please wrap {np_the}.",
    "This is a present for my {person}, no receipt please.",
    "It's a gift for my {person}! Can you add a note?",
    "Birthday gift for my {person}. Please gift wrap {np_the}.",
    "Please send {np_the} together with the {mate}.", "Deliver after {date} please.",
    "Can {np_the} arrive before {date}?", "Need {np_the} by {date} for a dinner.",
    "Please use paper packaging for the {items}, no plastic.", "Fragile! {Items} inside.",
    "Use code TILL{n}0 at checkout.",
]


def en_note(lg):
    p = lg.product()
    s = en_slots(lg, p)
    s["spot"] = lg.noun(lg.L.nouns[lg.one(["door", "porch", "reception", "garage", "gate",
                                             "mailbox", "hallway", "door"])])
    s["neighbour"] = lg.noun(lg.L.nouns["neighbour"])
    s["person"] = lg.noun(lg.L.nouns[lg.one(PEOPLE)])
    s["np_the"] = lg.np(p["item"], det="the", colour=p["colour"] if lg.chance(0.5) else None)
    s["Items"] = cap(s["items"])
    text = fill(lg, EN_NOTE, s)
    if lg.chance(0.3):
        text += " " + lg.one(["Thanks!", "Thank you", "Cheers."])
    return text


PEOPLE = ["mother", "father", "daughter", "son", "sister", "brother", "grandmother", "friend",
          "wife", "husband", "partner", "boss", "teacher"]

EN_REVIEW_GOOD = [
    "Love this {one_item}, {adj1} and {adj2}.", "The {item} {be} {adj1} and really {adj2}.",
    "Great {one_item}!", "My new favourite {one_item}.", "Very {adj1} {items}.",
    "We use {pron} for {use1} every {day}.", "I use {pron} for {use1} and {use2}.",
    "Perfect for {use1} on a {day}.", "Bought a {col1} one for the {place}.",
    "Goes well with my {mates}.", "Easy to {verb1}.",
]
EN_REVIEW_BAD = [
    "{Fault} after two weeks.", "Came {fault}, disappointed.", "The {part} was {fault}.",
    "The {item} {was} {fault} on arrival.", "Not worth {price}.",
    "Would not buy again.", "Expected better quality.", "Customer service was helpful though.",
    "Too {adj1} for my {place}.", "Hard to {verb1}.",
]


def en_review(lg):
    p = lg.product()
    s = en_slots(lg, p)
    s["Fault"] = s["fault"] and cap(s["fault"])
    stars = lg.rng.choice([5, 5, 5, 4, 4, 3, 2, 1])
    out = [lg.one(["%d stars." if stars > 1 else "%d star.", "%d/5", "Rated %d out of 5.",
                   "%d*"]) % stars]
    pool = EN_REVIEW_GOOD if stars >= 4 else EN_REVIEW_BAD
    for _ in range(lg.rng.randint(1, 3)):
        sent = fill(lg, pool, s)
        if sent not in out:
            out.append(sent)
        s.update({k: v for k, v in en_slots(lg, p).items()})
        s["Fault"] = s["fault"] and cap(s["fault"])
    return " ".join(out)


# ---------------------------------------------------------------------------------------
# Spanish documents (own templates, not translations of the English ones)


def es_end(f, plural, stem):
    """stem + agreement ending: apt -> apto / apta / aptos / aptas."""
    return stem + ("a" if f["g"] == "f" else "o") + ("s" if plural else "")


def es_the(lg, c, plural=False):
    """Definite noun phrase of concept c: el asa, la taza, los vasos."""
    f = lg.form(c)
    plural = plural and bool(f["pl"])
    return "%s %s" % (lg.det("the", f, plural), lg.noun(f, plural))


def es_a(lg, c):
    f = lg.form(c)
    return "%s %s" % (lg.det("a", f, False), lg.noun(f))


def contract(text):
    return re.sub(r"\bde el\b", "del", re.sub(r"\ba el\b", "al", text))


def es_slots(lg, p, f, plural):
    it = p["item"]
    pr = it.prof
    u1, u2 = two(lg, pr["use"])
    a1, a2 = two(lg, pr["adj"])
    v1, v2 = two(lg, pr["verb"])
    c1, c2 = two(lg, pr["colour"])
    mate = pr["mate"].draw(lg.rng)
    part = pr["part"].draw(lg.rng)
    fault = pr["fault"].draw(lg.rng)
    place = pr["place"].draw(lg.rng)
    appl = pr["appliance"].draw(lg.rng)
    # Mostly the product's own material, so a listing does not contradict itself.
    mat = p["material"] if lg.chance(0.8) else pr["material"].draw(lg.rng)
    pf = part and lg.form(part)
    s = {
        "item": lg.noun(f, plural), "one_item": lg.noun(f),
        "the_item": "%s %s" % (lg.det("the", f, plural), lg.noun(f, plural)),
        "this_item": "%s %s" % (lg.det("this", f, plural), lg.noun(f, plural)),
        "pron": lg.pron(f, plural), "Pron": cap(lg.pron(f, plural)),
        "ser": "son" if plural else "es", "Ser": "Son" if plural else "Es",
        "estar": "están" if plural else "está",
        "llegar": "llegaron" if plural else "llegó", "Llegar": "Llegaron" if plural else "Llegó",
        "romper": "rompieron" if plural else "rompió",
        "use1": u1 and use_noun(lg, u1, lg.form(u1)),
        "use2": u2 and use_noun(lg, u2, lg.form(u2)),
        "adj1": a1 and lg.agree(a1, f, plural), "adj2": a2 and lg.agree(a2, f, plural),
        "verb1": v1 and v1.es[0]["inf"], "verb2": v2 and v2.es[0]["inf"],
        "hand_verb": v1 and v1.key in HAND_VERBS and cap(v1.es[0]["inf"]),
        "care_verb": v1 and v1.key in CARE_VERBS and v1.es[0]["inf"],
        "col1": c1 and lg.agree(c1, f, plural), "col2": c2 and lg.agree(c2, f, plural),
        "col1_sg": c1 and lg.agree(c1, f, False),
        # A colour named as such ("en azul") takes the masculine singular.
        "col1_name": c1 and c1.es[0]["forms"][0], "col2_name": c2 and c2.es[0]["forms"][0],
        "the_mate": mate and es_the(lg, mate), "the_mates": mate and es_the(lg, mate, True),
        "the_part": part and "%s %s" % (lg.det("the", pf, False), lg.noun(pf)),
        "a_part": part and "%s %s" % (lg.det("a", pf, False), lg.noun(pf)),
        "part_adj": part and a1 and lg.agree(a1, pf, False),
        "part_fault": part and fault and lg.agree(fault, pf, False),
        "part_new": part and es_end(pf, False, "nuev"),
        "fault": fault and lg.agree(fault, f, plural),
        "the_place": place and es_the(lg, place), "place": place and lg.noun(lg.form(place)),
        "the_appl": appl and es_the(lg, appl), "appl": appl and lg.noun(lg.form(appl)),
        "mat": mat and lg.pick(mat.es, mat)["w"],
        "size": es_size(lg, p["size"]), "price": es_price(lg, p["price"]),
        "capacity": p["size"][0] == "ml" and es_size(lg, p["size"]),
        "dims": p["size"][0] != "ml" and es_size(lg, p["size"]),
        "date": es_date(lg).replace("el ", ""), "order": order_no(lg),
        "code": code_variant(lg, p["code"]), "n": str(lg.rng.randint(2, 5)),
        "days": es_plural(lg.L.days[lg.rng.randrange(7)].es[0]["w"]),
        "apto": es_end(f, plural, "Apt"), "made": es_end(f, plural, "Fabricad"),
        "pensado": es_end(f, plural, "Pensad"), "perfecto": es_end(f, plural, "perfect"),
        "Perfecto": es_end(f, plural, "Perfect"), "bonito": es_end(f, False, "bonit"),
        "disp": "Disponibles" if plural else "Disponible",
        "our": es_end(lg.form(mate), False, "nuestr") if mate else None,
    }
    return s


ES_LISTING = [
    "Ideal para {use1} y {use2}.", "{pensado} para {use1}.", "{Perfecto} para {use1} o {use2}.",
    "{made} en {mat}.", "{made} en {mat}, {adj1} y {adj2}.", "{Ser} de {mat}.",
    "{apto} para {appl}.", "Se puede meter en {the_appl}.", "No {apto_lc} para {appl}.",
    "Fácil de {verb1}.", "Muy fácil de {verb1} y de {verb2}.", "{hand_verb} a mano.",
    "Se recomienda {care_verb} después de cada uso.",
    "Queda genial en {the_place}.", "Imprescindible en cualquier {place}.",
    "Dale un toque cálido a tu {place}.",
    "{Ser} {adj1} y {adj2}.", "{Ser} muy {adj1}, además de {adj2}.", "Realmente {adj1}.",
    "Con {a_part} {part_adj}.", "{The_part} es {part_adj}.",
    "Combina con {our} {mate_noun}.", "A juego con {the_mate} de la colección.",
    "Combina con {the_mates}.",
    "{disp} también en {col1_name}.", "{disp} en {col1_name} y {col2_name}.",
    "Medidas: {dims}.", "Tamaño: {size}.", "Capacidad: {capacity}.",
    "Garantía de {n} años.", "Entrega en {n} días laborables.",
]


def es_listing(lg):
    p = lg.product()
    it = p["item"]
    f = lg.form(it)
    plural = p["pack"] > 1 and bool(f["pl"])

    def slots():
        s = es_slots(lg, p, f, plural)
        s["apto_lc"] = s["apto"].lower()
        s["The_part"] = s["the_part"] and cap(s["the_part"])
        mate = s["the_mate"]
        s["mate_noun"] = mate and mate.split(" ", 1)[1]
        return s

    s = slots()
    adj = p["adj"] if p["adj"] and p["adj"].key not in NOT_IN_TITLES else None
    head = lg.np(it, det=None, plural=plural, material=p["material"],
                 colour=p["colour"] if lg.chance(0.6) else None,
                 adj=adj if lg.chance(0.4) else None, f=f)
    bits = [cap(head) + " " + p["brand"] + " " + s["code"], s["size"]]
    if p["pack"] > 1:
        bits.append(lg.one(["juego de %d", "pack de %d", "lote de %d", "%d uds.",
                            "%d unidades"]) % p["pack"])
    title = lg.one([", ", " - ", " · "]).join(bits)
    if lg.chance(0.06):
        title = title.upper()
    sents = []
    for _ in range(lg.rng.randint(2, 5)):
        sent = contract(fill(lg, ES_LISTING, s))
        if sent not in sents:
            sents.append(sent)
        s = slots()
    if lg.chance(0.55):
        sents.append(fill(lg, ["Precio: {price}.", "Ahora {price}.", "Solo {price}",
                               "{price} IVA incluido."], s))
    return title.replace(" .", ".") + ". " + " ".join(sents)


ES_SUPPORT_PROBLEM = [
    "Pedí {np_a} ({code}) el {date} y {llegar} {fault}.",
    "Compré {np_a}, referencia {code}, el {date} y me {llegar} {fault}.",
    "El {date} recibí {np_a} ({code}) y {estar} {fault}.",
    "{The_part} de {np_the} que recibí está {part_fault}.",
    "{The_part} de {np_the} se quedó {part_fault} a la primera {period}.",
    "Hay {a_defect} en {np_the} del pedido {order}.",
    "{Np_the} tiene {a_defect} cerca de {the_part}.",
    "Al abrir la caja encontré {a_defect} en {np_the}.",
    "Todavía estoy esperando el pedido {order}, tenía que llegar el {date}.",
    "Mi pedido {order} no ha llegado. El seguimiento pone {date}.",
    "El pedido {order} aparece como entregado el {date} pero no he recibido nada. "
    "Era {np_a}.",
    "¿Cómo se puede {verb1} {np_the}?", "¿Se puede {verb1} {np_the}?",
    "¿Cuál es la mejor forma de {verb1} {np_the}? ¿Va en {the_appl}?",
    "¿{np_the_cap} se puede meter en {the_appl}?",
    "El color de {np_the} no es como en la foto, parece más {col1}.",
    "Quería {np_the} en {col1_name} pero me {llegar} en otro color.",
    "¿Puedo devolver {np_the}? {Ser} demasiado {adj1} para mi {place}.",
    "Necesito {np_the} en una talla más grande que {size}.",
]

ES_SUPPORT_CLOSE = [
    "¿Me podéis enviar otro?", "Quiero que me devuelvan el dinero.",
    "¿Me pueden mandar uno nuevo?", "Espero respuesta.", "¡Gracias!", "Gracias.",
    "¿Qué puedo hacer?", "¿Me ayudáis?", "Quiero devolver{pron}.", "Un saludo.", "Saludos",
    "Necesito {a_part} {part_new}.", "",
]


def es_support(lg):
    p = lg.product()
    it = p["item"]
    f = lg.form(it)
    plural = p["pack"] > 1 and bool(f["pl"]) and lg.chance(0.5)
    s = es_slots(lg, p, f, plural)
    s["np_a"] = lg.np(it, det="a", plural=plural, f=f,
                      colour=p["colour"] if lg.chance(0.5) else None,
                      material=p["material"] if lg.chance(0.5) else None)
    s["np_the"] = lg.np(it, det="the", plural=plural, f=f,
                        material=p["material"] if lg.chance(0.3) else None)
    s["Np_the"] = cap(s["np_the"])
    s["np_the_cap"] = s["Np_the"]
    s["The_part"] = s["the_part"] and cap(s["the_part"])
    s["period"] = lg.one(["semana", "lavada", "vez"])
    s["a_defect"] = es_a(lg, lg.L.nouns[lg.one(["crack", "scratch", "dent", "stain", "leak",
                                                "hole", "smell", "noise", "mark"])])
    greet = lg.one(["Hola,", "Hola.", "Buenas,", "Buenos días,", "Buenas tardes,", "",
                    "Hola equipo de Tillwick,", "Estimados señores:"])
    body = fill(lg, ES_SUPPORT_PROBLEM, s)
    if greet.endswith(",") or greet.endswith(":"):
        body = body[:1].lower() + body[1:] if lg.chance(0.5) else body
    out = [greet, contract(body), fill(lg, ES_SUPPORT_CLOSE, s)]
    if lg.chance(0.3):
        out.append(lg.one(["Pedido %s." % s["order"], "Número de pedido: %s" % order_no(lg),
                           "Enviado desde mi móvil", "Saludos, %s" % lg.one(
                               ["Marta", "J.", "Luis", "Ana", "P", "Carmen", "Dani"])]))
    return " ".join(x for x in out if x)


ES_NOTE = [
    "Por favor, dejar el paquete en {the_spot}.", "Si no hay nadie, dejadlo en {the_spot}.",
    "Si no estoy, dejadlo con el vecino.", "Llamar al timbre dos veces o dejar en {the_spot}.",
    "Es un regalo para mi {person}, ¿podéis envolver {np_the}?",
    "Regalo para mi {person}, sin factura por favor.",
    "¡Es para el cumpleaños de mi {person}! ¿Podéis añadir una nota?",
    "Regalo para mi {person}. Envolver {np_the} para regalo, por favor.",
    "Enviad {np_the} junto con {the_mate}, por favor.", "Entregar después del {date}.",
    "¿Puede llegar {np_the} antes del {date}?",
    "Necesito {np_the} antes del {date} para una cena.",
    "Por favor, embalaje de papel para {the_items}, sin plástico.",
    "¡Frágil! Dentro van {the_items}.", "Usad el código TILL{n}0 al pagar.",
]


def es_note(lg):
    p = lg.product()
    it = p["item"]
    f = lg.form(it)
    s = es_slots(lg, p, f, False)
    s["the_spot"] = es_the(lg, lg.L.nouns[lg.one(["door", "porch", "reception", "garage",
                                                   "gate", "mailbox", "door"])])
    s["person"] = lg.noun(lg.form(lg.L.nouns[lg.one(PEOPLE)]))
    s["np_the"] = lg.np(it, det="the", f=f, colour=p["colour"] if lg.chance(0.5) else None)
    s["the_items"] = "%s %s" % (lg.det("the", f, bool(f["pl"])), lg.noun(f, True))
    text = contract(fill(lg, ES_NOTE, s))
    if lg.chance(0.3):
        text += " " + lg.one(["¡Gracias!", "Gracias", "Un saludo."])
    return text


ES_REVIEW_GOOD = [
    "Me encanta {this_item}, {ser} {adj1} y {adj2}.", "{This_item} {ser} muy {adj1}.",
    "¡Qué {one_item} tan {bonito}!", "{Pron} usamos para {use1} todos los {days}.",
    "{Pron} uso para {use1} y para {use2}.", "{Perfecto} para {use1} los {days}.",
    "{Pron} compré en {col1_name} para {the_place}.", "Queda muy bien con {the_mates}.",
    "Muy fácil de {verb1}.",
]
ES_REVIEW_BAD = [
    "Se {romper} a las dos semanas, qué pena.", "{Llegar} {fault}, muy decepcionada.",
    "{The_item} {llegar} {fault}.", "No vale {price}.", "No lo volvería a comprar.",
    "Esperaba más calidad.", "Eso sí, atención al cliente de diez.",
    "{The_part} se quedó {part_fault}.", "Difícil de {verb1}.",
]


def es_review(lg):
    p = lg.product()
    it = p["item"]
    f = lg.form(it)
    plural = p["pack"] > 1 and bool(f["pl"])

    def slots():
        s = es_slots(lg, p, f, plural)
        s["This_item"] = cap(s["this_item"])
        s["The_item"] = cap(s["the_item"])
        s["The_part"] = s["the_part"] and cap(s["the_part"])
        return s

    stars = lg.rng.choice([5, 5, 5, 5, 4, 4, 3, 2, 1])
    out = [lg.one(["%d estrellas." if stars > 1 else "%d estrella.", "%d/5", "Nota: %d de 5.",
                   "%d*"]) % stars]
    pool = ES_REVIEW_GOOD if stars >= 4 else ES_REVIEW_BAD
    for _ in range(lg.rng.randint(1, 3)):
        sent = contract(fill(lg, pool, slots()))
        if sent not in out:
            out.append(sent)
    return " ".join(out)


# ---------------------------------------------------------------------------------------
# Mess: typos, casing, dropped accents, spacing

KEYS_NEAR = {
    "a": "sq", "b": "vn", "c": "xv", "d": "sf", "e": "wr", "f": "dg", "g": "fh", "h": "gj",
    "i": "uo", "j": "hk", "k": "jl", "l": "k", "m": "n", "n": "bm", "o": "ip", "p": "o",
    "q": "w", "r": "et", "s": "ad", "t": "ry", "u": "yi", "v": "cb", "w": "qe", "x": "zc",
    "y": "tu", "z": "x",
}
WORD_RE = re.compile(r"[^\W\d_]{4,}")


def typo(rng, w):
    i = rng.randrange(1, len(w))
    op = rng.random()
    if op < 0.3:
        return w[:i - 1] + w[i] + w[i - 1] + w[i + 1:]
    if op < 0.55:
        return w[:i] + w[i + 1:]
    if op < 0.75:
        return w[:i] + w[i] + w[i:]
    near = KEYS_NEAR.get(w[i].lower())
    if near:
        return w[:i] + rng.choice(near) + w[i + 1:]
    return w


def strip_accents(text, keep_enye):
    out = []
    for ch in text:
        if ch in "ñÑ" and keep_enye:
            out.append(ch)
            continue
        d = unicodedata.normalize("NFD", ch)
        out.append(d[0] if d[0].isascii() else ch)
    return "".join(out)


def mess(lg, text, kind, rate):
    rng = lg.rng
    text = WORD_RE.sub(lambda m: typo(rng, m.group(0)) if rng.random() < rate else m.group(0),
                       text)
    informal = kind in ("support", "note", "review")
    if informal and lg.name == "es" and rng.random() < 0.3:
        text = strip_accents(text, keep_enye=rng.random() < 0.7)
        if rng.random() < 0.6:
            text = text.replace("¿", "").replace("¡", "")
    if informal and rng.random() < 0.1:
        text = text.lower()
    elif informal and rng.random() < 0.05:
        words = text.split(" ")
        j = rng.randrange(len(words))
        words[j] = words[j].upper()
        text = " ".join(words)
    if informal and rng.random() < 0.15:
        text = re.sub(r"[.!?]$", rng.choice(["", "!!", "...", " :(", " :)", "??"]), text)
    if rng.random() < 0.03:
        text = text.replace(", ", " ,", 1)
    if rng.random() < 0.03:
        text = text.replace(" ", "  ", 1)
    return text


# ---------------------------------------------------------------------------------------
# Word lists and the tiny vector table

TOKEN_RE = re.compile(r"\w+(?:['\u2019]\w+)*")


def count_tokens(lines):
    counts = {}
    for line in lines:
        for w in TOKEN_RE.findall(line.lower()):
            counts[w] = counts.get(w, 0) + 1
    return counts


def concept_pairs(c):
    """(english word, [spanish words]) pairs a concept gives, in all its forms."""
    out = []
    if c.kind in ("item",) or c.kind in lex.NOUNS:
        es_sg = [f["sg"] for f in c.es]
        es_pl = [f["pl"] for f in c.es if f["pl"]]
        for e in c.en:
            out.append((e["sg"], es_sg))
            if e["pl"] and e["pl"] != e["sg"]:
                out.append((e["pl"], es_pl or es_sg))
    elif c.kind in ("colour", "adj", "faulty"):
        forms = []
        for f in c.es:
            forms += [x for x in f["forms"] if x not in forms]
        for e in c.en:
            out.append((e["w"], forms))
    elif c.kind == "material":
        for e in c.en:
            out.append((e["w"], [f["w"] for f in c.es]))
    elif c.kind == "verb":
        e, s = c.en[0], c.es[0]
        out.append((e["base"], [s["inf"], s["imp"], s["p1"]]))
        out.append((e["p3"], [s["p3"]]))
        if e["past"] != e["base"]:
            out.append((e["past"], [s["pret1"], s["pret3"], s["part"]]))
    else:
        out.append((c.en[0]["w"], [c.es[0]["w"]]))
    return out


def word_lists(L, en_counts, es_counts, rng, min_count):
    """Split concepts into seed and test so that no English word is on both sides."""
    concepts = L.all_concepts()
    # Concepts that share an English word go together (e.g. glass the item and glass
    # the material), so a source word never lands on both sides.
    parent = list(range(len(concepts)))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    owner = {}
    cpairs = [concept_pairs(c) for c in concepts]
    for i, pairs in enumerate(cpairs):
        for en, _ in pairs:
            if en in owner:
                parent[find(i)] = find(owner[en])
            else:
                owner[en] = i
    groups = {}
    for i in range(len(concepts)):
        groups.setdefault(find(i), []).append(i)
    roots = sorted(groups)
    rng.shuffle(roots)
    order = []
    for root in roots:
        merged = {}
        for i in groups[root]:
            for en, es in cpairs[i]:
                if " " in en or en_counts.get(en, 0) < min_count:
                    continue
                targets = [t for t in es if es_counts.get(t, 0) >= min_count and " " not in t]
                if not targets:
                    continue
                lst = merged.setdefault(en, [])
                for t in targets:       # 'fácil' is both the masculine and feminine form
                    if t not in lst:
                        lst.append(t)
        if merged:
            order.append(merged)
    seed, test = [], []
    for k, merged in enumerate(order):
        # Two in five groups seed the map, the rest are held out for testing.
        (seed if k % 5 < 2 else test).append(merged)
    return seed, test


def write_pairs(path, groups, header):
    lines = ["# " + h for h in header]
    n = 0
    for merged in groups:
        for en in sorted(merged):
            for es in merged[en]:
                lines.append("%s\t%s" % (en, es))
                n += 1
    write_text(path, "\n".join(lines) + "\n")
    return n


def tiny_table(L, rng):
    """A few dozen shop words with 8 components: one direction per kind plus noise."""
    kinds = ["cookware", "tableware", "textiles", "garden", "colour", "material"]
    centre = {}
    for k in kinds:
        v = [rng.gauss(0, 1) for _ in range(8)]
        n = math.sqrt(sum(x * x for x in v))
        centre[k] = [x / n for x in v]
    rows = []
    seen = set()
    for k in kinds:
        if k == "colour":
            words = [c.en[0]["w"] for c in list(L.colours.values())[:6]]
        elif k == "material":
            words = [c.en[0]["w"] for c in list(L.materials.values())[:6]]
        else:
            words = [c.en[0]["sg"] for c in L.items if c.cat == k][:6]
        for w in words:
            v = [x + rng.gauss(0, 0.25) for x in centre[k]]
            if w in seen:    # 'glass' is an item and a material: one row per word
                continue
            seen.add(w)
            rows.append((w, v))
    lines = ["%d 8" % len(rows)]
    for w, v in rows:
        lines.append(w + " " + " ".join("%.4f" % x for x in v))
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------------------------------
# Output


def write_text(path, text):
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8", newline="\n") as f:
        f.write(text)
    os.replace(tmp, path)


def write_gzip(path, lines):
    buf = io.BytesIO()
    with gzip.GzipFile(filename="", mode="wb", fileobj=buf, mtime=0, compresslevel=9) as gz:
        for line in lines:
            gz.write(line.encode("utf-8"))
            gz.write(b"\n")
    tmp = path + ".tmp"
    with open(tmp, "wb") as f:
        f.write(buf.getvalue())
    os.replace(tmp, path)


def generate(lg, n_docs, makers, weights, rate):
    lines = []
    for _ in range(n_docs):
        kind, fn = lg.rng.choices(makers, weights)[0]
        text = fn(lg)
        text = re.sub(r"\s+", " ", text).strip()
        lines.append(mess(lg, text, kind, rate))
    return lines


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--seed", type=int, default=7, help="random seed [default: 7]")
    ap.add_argument("--out", default="data-samples", help="output directory")
    ap.add_argument("--docs", type=int, default=75000,
                    help="English documents; Spanish gets 90%% as many [default: 75000]")
    args = ap.parse_args()

    L = Lexicon()
    rng = random.Random("%d-catalogue" % args.seed)
    products = build_catalogue(L, rng)
    en = English("en", L, products, args.seed)
    es = Spanish("es", L, products, args.seed)

    en_lines = generate(en, args.docs, [("listing", en_listing), ("support", en_support),
                                        ("note", en_note), ("review", en_review)],
                        [0.42, 0.30, 0.10, 0.18], 0.012)
    # The Spanish storefront is newer: fewer listings per product, more support text,
    # and a somewhat different mix, as two markets of one shop would have.
    es_lines = generate(es, int(args.docs * 0.9),
                        [("listing", es_listing), ("support", es_support), ("note", es_note),
                         ("review", es_review)],
                        [0.38, 0.34, 0.12, 0.16], 0.015)

    os.makedirs(args.out, exist_ok=True)
    write_gzip(os.path.join(args.out, "tillwick-en.txt.gz"), en_lines)
    write_gzip(os.path.join(args.out, "tillwick-es.txt.gz"), es_lines)

    en_counts, es_counts = count_tokens(en_lines), count_tokens(es_lines)
    seed, test = word_lists(L, en_counts, es_counts, random.Random("%d-split" % args.seed), 5)
    n_seed = write_pairs(os.path.join(args.out, "demo-seed.pairs"), seed, [
        "Tillwick Goods demo (invented): English -> Spanish seed pairs for fitting the map.",
        "Made by tools/dev/make-demo.py --seed %d; no source word here is in demo-test.pairs."
        % args.seed])
    n_test = write_pairs(os.path.join(args.out, "demo-test.pairs"), test, [
        "Tillwick Goods demo (invented): English -> Spanish test pairs; a source word may",
        "have several gold targets (agreement forms, synonyms). Made by tools/dev/make-demo.py "
        "--seed %d." % args.seed])
    write_text(os.path.join(args.out, "tiny-en.txt"),
               tiny_table(L, random.Random("%d-tiny" % args.seed)))

    def summary(name, lines, counts):
        return "%s: %d lines, %d tokens, %d types, %d types with count >= 5" % (
            name, len(lines), sum(counts.values()), len(counts),
            sum(1 for v in counts.values() if v >= 5))
    print(summary("en", en_lines, en_counts), file=sys.stderr)
    print(summary("es", es_lines, es_counts), file=sys.stderr)
    print("seed: %d pairs, %d source words; test: %d pairs, %d source words; %d concepts" % (
        n_seed, sum(len(g) for g in seed), n_test, sum(len(g) for g in test),
        len(L.all_concepts())), file=sys.stderr)


if __name__ == "__main__":
    main()
