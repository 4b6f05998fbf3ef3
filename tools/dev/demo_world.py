"""The demo scenario's world: word forms, the concept table, the shop's catalogue, the two
languages' realisers and how each market writes numbers, money, dates and sizes.

Part of the demo generator (make-demo.py, which documents the whole); demo_docs.py writes
the documents from what is built here.
"""

import math
import random
import re
import sys

import demo_lexicon as lex

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
