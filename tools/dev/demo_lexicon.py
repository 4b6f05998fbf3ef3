"""The bilingual concept table of the Tillwick Goods demo scenario (invented shop).

Every entry is written by hand for this project: everyday English and Spanish words for
home and kitchen goods. Notation, one concept per line:

    english[/plural][, synonym[/plural]] = spanish[/plural] GENDER[, synonym[/plural] GENDER]

GENDER is m or f; "fA" marks a feminine noun that takes "el"/"un" in the singular
(el asa, el agua). A plural written as "-" means the word has no plural in use.
Plurals left out follow the regular rules in make-demo.py.

Adjectives:  english = spanish_masculine[, synonym]   (feminine and plural by rule;
             a trailing * marks an adjective with one form for both genders, e.g. rosa)
Verbs:       english[ past] = spanish_infinitive[ key=form ...]
             keys: p3 (present 3rd sg), p1 (present 1st sg), pret1, pret3, part, imp (usted)
"""

# Items by category. The category decides which materials, colours, uses, actions and
# faults a product can have (see PROFILES).
ITEMS = {
    "cookware": """
        pan, skillet = sartén/sartenes f
        pot = olla f
        saucepan = cazo m
        casserole = cacerola f
        wok = wok/woks m
        lid = tapa f
        kettle = hervidor m
        steamer = vaporera f
        roaster = asadera f
        colander = escurridor m
        ladle = cucharón m
        spatula = espátula f
        whisk = batidor m, varillas/varillas f
        grater = rallador m
        peeler = pelador m
        sieve = tamiz m, colador m
        tray = bandeja f
        mould, mold = molde m
        thermometer = termómetro m
        timer = temporizador m
        scale = báscula f
        funnel = embudo m
        mortar = mortero m
        skewer = brocheta f
        knife/knives = cuchillo m
        sharpener = afilador m
        corkscrew = sacacorchos/sacacorchos m
        opener = abridor m
        apron = delantal m
        mitt = manopla f
        trivet = salvamanteles/salvamanteles m
        board = tabla f
        rollingpin = rodillo m
    """,
    "tableware": """
        plate = plato m
        bowl = cuenco m, bol/boles m
        mug = tazón m
        cup = taza f
        saucer = platillo m
        glass/glasses = vaso m
        goblet = copa f
        jug, pitcher = jarra f
        teapot = tetera f
        coffeepot = cafetera f
        fork = tenedor m
        spoon = cuchara f
        teaspoon = cucharilla f, cucharita f
        platter = fuente f
        eggcup = huevera f
        coaster = posavasos/posavasos m
        cutlery/- = cubertería/- f, cubiertos/cubiertos m
        dish/dishes = plato m
        ramekin = cazuelita f
        carafe = garrafa f
        straw = pajita f
    """,
    "storage": """
        jar = tarro m, bote m
        tin = lata f
        box/boxes = caja f
        basket = cesta f, cesto m
        drawer = cajón m
        shelf/shelves = estante m, balda f
        rack = rejilla f
        hook = gancho m
        hanger = percha f
        organiser, organizer = organizador m
        container = recipiente m, táper/tápers m
        bottle = botella f
        flask = termo m
        lunchbox/lunchboxes = fiambrera f, tartera f
        bag = bolsa f
        label = etiqueta f
        trunk = baúl m
        dispenser = dispensador m
        holder = soporte m
        crate = cajonera f
    """,
    "cleaning": """
        broom = escoba f
        mop = fregona f
        bucket = cubo m
        bin = papelera f
        sponge = esponja f
        cloth = paño m, trapo m
        brush/brushes = cepillo m
        duster = plumero m
        dustpan = recogedor m
        vacuum = aspiradora f
        detergent = detergente m
        soap = jabón m
        bleach/- = lejía/- f
        glove = guante m
        scrubber = estropajo m
        wipe = toallita f
        comb = peine m
        razor = maquinilla f
    """,
    "textiles": """
        towel = toalla f
        blanket = manta f
        sheet = sábana f
        pillow = almohada f
        pillowcase = funda f
        cushion = cojín m
        curtain = cortina f
        rug, carpet = alfombra f
        duvet = edredón m
        quilt = colcha f
        mattress/mattresses = colchón m
        mat = alfombrilla f
        robe, bathrobe = albornoz m
        slipper = zapatilla f
        hammock = hamaca f
        runner = camino m
        napkin = servilleta f
        tablecloth = mantel m
    """,
    "furniture": """
        chair = silla f
        table = mesa f
        stool = taburete m
        bench/benches = banco m
        sofa, couch/couches = sofá/sofás m
        armchair = sillón m, butaca f
        desk = escritorio m
        bed = cama f
        wardrobe = armario m
        bookcase = estantería f
        dresser = cómoda f
        nightstand = mesilla f
        mirror = espejo m
        cot = cuna f
        sideboard = aparador m
        headboard = cabecero m
    """,
    "lighting": """
        lamp = lámpara f
        bulb = bombilla f
        candle = vela f
        lantern = farol m
        torch/torches, flashlight = linterna f
        candlestick = candelabro m
        lampshade = pantalla f
        garland = guirnalda f
    """,
    "garden": """
        planter, flowerpot = maceta f
        hose = manguera f
        rake = rastrillo m
        shovel, spade = pala f
        sprinkler = aspersor m
        trowel = desplantador m
        wheelbarrow = carretilla f
        seed = semilla f
        fence = valla f
        parasol = sombrilla f
        deckchair = tumbona f
        barbecue = barbacoa f
        grill = parrilla f
        lawnmower = cortacésped/cortacéspedes m
        birdfeeder = comedero m
    """,
    "tools": """
        hammer = martillo m
        screwdriver = destornillador m
        drill = taladro m
        wrench/wrenches = llave f
        saw = sierra f
        ladder = escalera f
        nail = clavo m
        screw = tornillo m
        glue/- = pegamento m, cola f
        battery/batteries = pila f
        cable = cable m
        plug = enchufe m
        lock = cerradura f
        padlock = candado m
        toolbox/toolboxes = caja f
        tape/- = cinta f
    """,
    "appliances": """
        toaster = tostadora f
        blender = batidora f
        fridge, refrigerator = nevera f, frigorífico m
        freezer = congelador m
        microwave = microondas/microondas m
        oven = horno m
        dishwasher = lavavajillas/lavavajillas m
        heater = estufa f, calefactor m
        fan = ventilador m
        iron = plancha f
        grinder = molinillo m
        juicer = exprimidor m
        fryer = freidora f
        humidifier = humidificador m
        clock = reloj/relojes m
        radio = radio f
        hob = placa f
    """,
}

# Materials: English uses the word before the noun, Spanish "de X" after it.
MATERIALS = """
    steel = acero
    aluminium, aluminum = aluminio
    copper = cobre
    brass = latón
    iron = hierro
    glass = vidrio, cristal
    ceramic = cerámica
    porcelain = porcelana
    stoneware = gres
    earthenware = loza
    bamboo = bambú
    wood, wooden = madera
    oak = roble
    pine = pino
    walnut = nogal
    beech = haya
    wicker = mimbre
    rattan = ratán
    cotton = algodón
    linen = lino
    wool, woollen = lana
    silk = seda
    velvet = terciopelo
    leather = cuero, piel
    plastic = plástico
    silicone = silicona
    rubber = goma, caucho
    marble = mármol
    granite = granito
    slate = pizarra
    cork = corcho
    felt = fieltro
    jute = yute
    enamel = esmalte
    concrete = hormigón
    paper = papel
    cardboard = cartón
    stone = piedra
    clay = barro
    microfibre, microfiber = microfibra
    terracotta = terracota
"""

COLOURS = """
    white = blanco
    black = negro
    red = rojo
    blue = azul
    green = verde
    yellow = amarillo
    grey, gray = gris
    brown = marrón
    pink = rosa*
    orange = naranja*
    purple = morado
    beige = beis*
    cream = crema*
    gold, golden = dorado
    silver = plateado
    turquoise = turquesa*
    olive = oliva*
    mustard = mostaza*
    terracotta = terracota*
    coral = coral*
    natural = natural
    clear, transparent = transparente
    lilac = lila*
    navy = marino
    copper = cobrizo
"""

ADJECTIVES = """
    small = pequeño
    large, big = grande
    tiny = diminuto
    huge = enorme
    tall = alto
    short = corto, bajo
    wide = ancho
    narrow = estrecho
    deep = hondo, profundo
    heavy = pesado
    lightweight = ligero
    thick = grueso
    thin = fino, delgado
    soft = suave, blando
    hard = duro
    smooth = liso
    rough = áspero
    sturdy = resistente, robusto
    durable = duradero
    flimsy = endeble
    sharp = afilado
    blunt = desafilado
    warm = cálido
    cold = frío
    hot = caliente
    new = nuevo
    old = viejo
    cheap = barato
    expensive = caro
    beautiful, pretty = bonito, precioso
    ugly = feo
    elegant = elegante
    modern = moderno
    rustic = rústico
    classic = clásico
    simple = sencillo
    handmade = artesanal
    waterproof = impermeable
    reusable = reutilizable
    foldable, folding = plegable
    stackable = apilable
    adjustable = regulable, ajustable
    portable = portátil
    compact = compacto
    clean = limpio
    dirty = sucio
    dry = seco
    wet = mojado
    empty = vacío
    full = lleno
    round = redondo
    square = cuadrado
    oval = ovalado
    rectangular = rectangular
    nonstick = antiadherente
    cosy, cozy = acogedor
    quiet = silencioso
    noisy = ruidoso
    fast = rápido
    slow = lento
    easy = fácil
    perfect = perfecto
    excellent = excelente
    good = bueno
    bad = malo
    useful = útil
    practical = práctico
    comfortable = cómodo
    strong = fuerte
    fragile = frágil
    safe = seguro
    powerful = potente
    washable = lavable
"""

# Faults as adjectives (participles): "arrived broken" / "llegó rota".
FAULTS = """
    broken = roto
    cracked = agrietado, rajado
    chipped = desportillado
    scratched = rayado
    dented = abollado
    bent = doblado
    stained = manchado
    torn = rasgado
    faded = desteñido
    loose = suelto
    damaged = dañado
    defective, faulty = defectuoso
    rusty = oxidado
    wobbly = inestable
    warped = deformado
    burnt, burned = quemado
    sticky = pegajoso
    smelly = apestoso
"""

# Other nouns of the shop's world.
NOUNS = {
    "fault": """
        crack = grieta f
        scratch/scratches = arañazo m, rayón m
        dent = abolladura f
        stain = mancha f
        leak = fuga f
        hole = agujero m
        smell = olor m
        noise = ruido m
        rust/- = óxido m
        mark = marca f
        delay = retraso m
        mistake = error/errores m
        damage/- = daño m
    """,
    "part": """
        handle = asa fA, mango m
        base = base f
        edge = borde m
        bottom = fondo m
        corner = esquina f
        side = lado m
        surface = superficie f
        coating = revestimiento m
        button = botón m
        switch/switches = interruptor m
        leg = pata f
        wheel = rueda f
        zip, zipper = cremallera f
        strap = correa f
        spout = pico m
        seam = costura f
        hinge = bisagra f
        cord = cordón m
    """,
    "shop": """
        order = pedido m
        parcel, package = paquete m
        delivery/deliveries = entrega f
        shipping/- = envío m
        courier = mensajero m, repartidor m
        address/addresses = dirección f
        refund = reembolso m
        return = devolución f
        replacement = repuesto m, recambio m
        discount = descuento m
        coupon, voucher = cupón m
        price = precio m
        invoice = factura f
        receipt = recibo m
        warranty/warranties, guarantee = garantía f
        customer = cliente m
        account = cuenta f
        payment = pago m
        card = tarjeta f
        size = tamaño m, talla f
        colour, color = color/colores m
        quality/qualities = calidad f
        item = artículo m
        product = producto m
        gift = regalo m
        packaging/- = embalaje m
        photo = foto f
        email = correo m
        message = mensaje m
        question = pregunta f
        answer = respuesta f
        problem = problema m
        team = equipo m
        service = servicio m
        website = web/webs f
        stock/- = existencias/existencias f
        instruction = instrucción f
        set = juego m
        pack = pack/packs m, lote m
        week = semana f
        day = día m
        month = mes/meses m
        year = año m
        morning = mañana f
        afternoon = tarde f
        evening = noche f
    """,
    "place": """
        kitchen = cocina f
        bathroom = baño m
        bedroom = dormitorio m
        garden = jardín m
        balcony/balconies = balcón m
        lounge = salón m
        hallway = pasillo m
        office = oficina f
        door = puerta f
        porch/porches = porche m
        garage = garaje m
        wall = pared/paredes f
        floor = suelo m
        window = ventana f
        home, house = casa f
        flat, apartment = piso m
        neighbour, neighbor = vecino m
        reception = recepción f
        gate = cancela f
        mailbox/mailboxes, letterbox/letterboxes = buzón m
        terrace = terraza f
        patio = patio m
    """,
    "people": """
        family/families = familia f
        friend = amigo m
        mother, mum, mom = madre f
        father, dad = padre m
        daughter = hija f
        son = hijo m
        sister = hermana f
        brother = hermano m
        grandmother, grandma = abuela f
        guest = invitado m
        wife/wives = mujer/mujeres f
        husband = marido m
        partner = pareja f
        boss/bosses = jefe m
        teacher = profesora f
    """,
    "food": """
        coffee = café/cafés m
        tea = té/tés m
        soup = sopa f
        bread/- = pan/panes m
        rice/- = arroz/- m
        pasta/- = pasta f
        water/- = agua fA
        milk/- = leche f
        oil = aceite m
        butter/- = mantequilla f
        cheese = queso m
        egg = huevo m
        cake = tarta f, pastel/pasteles m
        biscuit, cookie = galleta f
        salad = ensalada f
        fruit = fruta f
        vegetable = verdura f
        meat = carne f
        fish/- = pescado m
        chicken = pollo m
        sauce = salsa f
        sugar/- = azúcar/- m
        salt/- = sal/- f
        flour/- = harina f
        wine = vino m
        juice = zumo m
        ice/- = hielo m
        herb = hierba f
        spice = especia f
        jam = mermelada f
        honey/- = miel/- f
        toast/- = tostada f
        pizza = pizza f
        cereal = cereales/cereales m
        porridge/- = gachas/gachas f
        flower = flor/flores f
        plant = planta f
        book = libro m
        toy = juguete m
        shoe = zapato m
        clothes/clothes = ropa/- f
        laundry/- = colada f
        jewellery/-, jewelry/- = joyas/joyas f
        dog = perro m
        cat = gato m
    """,
}

VERBS = """
    wash = lavar
    clean = limpiar
    dry dried = secar
    cook = cocinar
    bake = hornear
    fry fried = freír p3=fríe p1=frío pret1=freí pret3=frió part=frito imp=fría
    boil = hervir p3=hierve p1=hiervo pret3=hirvió imp=hierva
    heat = calentar p3=calienta p1=caliento imp=caliente
    cut cut = cortar
    chop chopped = picar
    stir stirred = remover p3=remueve p1=remuevo imp=remueva
    pour = verter p3=vierte p1=vierto imp=vierta
    store = guardar
    hang hung = colgar p3=cuelga p1=cuelgo pret1=colgué imp=cuelgue
    fold = doblar
    stack = apilar
    fill = llenar
    empty emptied = vaciar p3=vacía p1=vacío imp=vacíe
    open = abrir part=abierto
    close = cerrar p3=cierra p1=cierro imp=cierre
    break broke = romper part=roto
    fix = arreglar
    replace = sustituir p3=sustituye p1=sustituyo pret3=sustituyó imp=sustituya
    change = cambiar
    return = devolver p3=devuelve p1=devuelvo part=devuelto imp=devuelva
    order = pedir p3=pide p1=pido pret3=pidió imp=pida
    buy bought = comprar
    send sent = enviar p3=envía p1=envío imp=envíe
    deliver = entregar
    receive = recibir
    arrive = llegar
    pay paid = pagar
    cancel cancelled = cancelar
    check = revisar
    need = necesitar
    want = querer p3=quiere p1=quiero pret1=quise pret3=quiso imp=quiera
    use = usar
    measure = medir p3=mide p1=mido pret3=midió imp=mida
    assemble = montar
    install = instalar
    carry carried = llevar
    protect = proteger imp=proteja p1=protejo
    scrub scrubbed = frotar
    rinse = enjuagar
    soak = remojar
    polish = pulir
    sharpen = afilar
    charge = cargar
    recommend = recomendar p3=recomienda p1=recomiendo imp=recomiende
    wait = esperar
    help = ayudar
    call = llamar
    write wrote = escribir part=escrito
    contact = contactar
    confirm = confirmar
    wrap wrapped = envolver p3=envuelve p1=envuelvo part=envuelto imp=envuelva
    pack = empaquetar
    leave left = dejar
    lose lost = perder p3=pierde p1=pierdo imp=pierda
    find found = encontrar p3=encuentra p1=encuentro imp=encuentre
    serve = servir p3=sirve p1=sirvo pret3=sirvió imp=sirva
    water = regar p3=riega p1=riego pret1=regué imp=riegue
    sweep swept = barrer
    iron = planchar
    sew = coser
    hold held = sujetar
    work = funcionar
    move = mover p3=mueve p1=muevo imp=mueva
    label labelled = etiquetar
    organise = organizar
    love = encantar
    keep kept = mantener p3=mantiene p1=mantengo pret1=mantuve pret3=mantuvo imp=mantenga
"""

DAYS = "monday lunes, tuesday martes, wednesday miércoles, thursday jueves, friday viernes, " \
       "saturday sábado, sunday domingo"
MONTHS = "january enero, february febrero, march marzo, april abril, may mayo, june junio, " \
         "july julio, august agosto, september septiembre, october octubre, " \
         "november noviembre, december diciembre"
NUMBERS = "one uno, two dos, three tres, four cuatro, five cinco, six seis, seven siete, " \
          "eight ocho, nine nueve, ten diez, twelve doce, twenty veinte"

# Which attributes each category of item draws on, named by their English words.
PROFILES = {
    "cookware": dict(
        materials="steel aluminium copper iron ceramic glass silicone enamel stoneware wood "
                  "bamboo granite",
        colours="black red grey blue green cream white silver orange copper",
        adjs="nonstick heavy deep large small sturdy durable round sharp compact lightweight "
             "practical useful hot easy",
        faults="scratched dented warped rusty burnt bent loose cracked chipped sticky",
        parts="handle lid base bottom coating edge spout",
        uses="soup rice pasta egg sauce meat fish chicken vegetable water porridge bread cake",
        verbs="cook fry boil heat stir wash store pour chop cut dry rinse soak sharpen",
        places="kitchen",
        appliances="oven dishwasher hob microwave fridge"),
    "tableware": dict(
        materials="porcelain stoneware ceramic glass earthenware bamboo wood steel marble slate",
        colours="white cream blue green grey black pink yellow terracotta olive mustard navy "
                "clear coral",
        adjs="elegant classic rustic modern handmade large small deep stackable beautiful "
             "fragile simple round square oval",
        faults="chipped cracked broken scratched stained faded",
        parts="handle edge base bottom side",
        uses="coffee tea soup salad cereal fruit juice wine water milk cake cheese pasta",
        verbs="serve wash stack pour dry store use",
        places="kitchen lounge terrace",
        appliances="dishwasher microwave"),
    "storage": dict(
        materials="glass plastic bamboo wicker steel wood cardboard jute rattan cotton "
                  "aluminium cork",
        colours="clear white grey natural black beige green blue",
        adjs="stackable large small compact reusable waterproof practical square rectangular "
             "foldable lightweight sturdy useful",
        faults="cracked broken bent loose torn warped dented",
        parts="lid handle corner side base hinge",
        uses="rice pasta flour sugar coffee tea biscuit cereal spice clothes toy book "
             "shoe jewellery",
        verbs="store keep stack fill empty organise hang fold close open label",
        places="kitchen bedroom hallway garage bathroom office",
        appliances="fridge freezer"),
    "cleaning": dict(
        materials="microfibre cotton plastic rubber wood bamboo steel silicone",
        colours="blue yellow green pink grey white orange red",
        adjs="reusable soft hard durable practical lightweight compact useful strong wet dry "
             "clean dirty",
        faults="broken torn loose smelly faded bent",
        parts="handle base edge side",
        uses="floor window laundry dog cat",
        verbs="clean scrub sweep rinse wash dry soak polish empty",
        places="kitchen bathroom floor garage hallway",
        appliances="dishwasher"),
    "textiles": dict(
        materials="cotton linen wool silk velvet microfibre jute felt leather",
        colours="white grey cream beige blue navy pink green mustard terracotta coral lilac "
                "black",
        adjs="soft warm cosy thick thin large small comfortable elegant handmade washable "
             "beautiful",
        faults="torn faded stained loose damaged smelly",
        parts="seam edge corner side zip strap",
        uses="bed sofa chair floor",
        verbs="wash dry iron fold hang sew",
        places="bedroom lounge bathroom hallway",
        appliances="iron"),
    "furniture": dict(
        materials="oak pine walnut beech wood steel rattan wicker velvet leather marble glass "
                  "bamboo",
        colours="white black natural grey brown green navy cream",
        adjs="sturdy modern rustic classic comfortable heavy tall wide narrow foldable "
             "adjustable elegant compact large",
        faults="wobbly scratched broken damaged loose cracked warped",
        parts="leg corner side surface hinge wheel base edge",
        uses="book clothes plant toy",
        verbs="assemble install hold fix move measure polish",
        places="lounge bedroom office hallway terrace",
        appliances=""),
    "lighting": dict(
        materials="glass brass copper paper rattan ceramic steel wood linen",
        colours="white black gold silver natural clear green",
        adjs="warm modern elegant small tall portable adjustable classic cosy beautiful",
        faults="broken faulty cracked loose bent",
        parts="switch cord base lampshade button",
        uses="book",
        verbs="install charge use hang",
        places="lounge bedroom office garden hallway terrace",
        appliances=""),
    "garden": dict(
        materials="terracotta clay stone concrete plastic steel wood rubber wicker aluminium",
        colours="green terracotta black grey white natural brown red",
        adjs="waterproof sturdy foldable large heavy lightweight durable portable",
        faults="cracked rusty broken bent faded ",
        parts="handle wheel base leg edge",
        uses="plant flower seed herb water",
        verbs="water store fold carry hang",
        places="garden balcony terrace patio garage",
        appliances=""),
    "tools": dict(
        materials="steel iron rubber plastic wood aluminium",
        colours="red black yellow orange blue grey",
        adjs="strong heavy compact portable useful sturdy sharp durable",
        faults="broken faulty rusty bent loose",
        parts="handle button switch base",
        uses="wall door shelf",
        verbs="fix hold install assemble charge measure",
        places="garage hallway kitchen",
        appliances=""),
    "appliances": dict(
        materials="steel plastic glass aluminium",
        colours="white black silver red grey cream",
        adjs="quiet noisy fast compact powerful portable modern easy practical",
        faults="faulty broken noisy smelly damaged",
        parts="button switch cord base lid plug",
        uses="coffee toast juice soup bread clothes water",
        verbs="use clean heat charge install",
        places="kitchen bathroom bedroom lounge",
        appliances=""),
}

# Invented brand lines of the shop. Codes are built from these prefixes.
BRANDS = [("Tillwick", "TW"), ("Tillwick Hearth", "TH"), ("Brindlemoor", "BM"),
          ("Quenby Loom", "QL"), ("Fernhatch", "FH"), ("Oxlowe", "OX"), ("Marrowlight", "ML"),
          ("Pellavine", "PV")]
