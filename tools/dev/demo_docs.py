"""The demo scenario's documents: product listings, support messages, order notes and
reviews, each language from templates of its own (not translations of each other).

Part of the demo generator (make-demo.py, which documents the whole); the catalogue and the
languages come from demo_world.py.
"""

import re

from demo_world import (code_variant, en_date, en_price, en_size, es_date, es_plural,
                        es_price, es_size, order_no)

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
