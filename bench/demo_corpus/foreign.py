"""Hand-written non-English records of the demo (German, Spanish, French, Portuguese).

Each carries the goals a reviewer would assign, so the known numbers can say
what an English-only model misses. `file` is where the record is exported; `partner` names the co-authoring institution.
"""

FOREIGN = (
    dict(
        lang="de", file="ris", year=2024, goals=("6",), dept="CEE", partner="Rabenfeld",
        title="Nitrateinträge ins Grundwasser unter Grünlandbetrieben: eine Langzeitstudie in zwei Karsteinzugsgebieten",
        keywords=("Grundwasser", "Nitrat", "Karst", "Trinkwasserschutz"),
        abstract=("Erhöhte Nitratkonzentrationen im Grundwasser gefährden die Trinkwasserversorgung in vielen ländlichen Regionen. "
                  "In Karstgebieten gelangt Sickerwasser besonders rasch in die Brunnen, sodass Bewirtschaftungsfehler kaum abgepuffert werden. "
                  "Ziel dieser Arbeit war es, die Wirkung veränderter Düngezeitpunkte auf die Nitratfracht in zwei Einzugsgebieten zu quantifizieren. "
                  "Dazu wurden über sechs Jahre monatlich Proben aus 48 Hausbrunnen und vier Quellen entnommen und mit Betriebsdaten zur Gülleausbringung verknüpft. "
                  "Ergänzend kamen Isotopenanalysen und ein einfaches Transferzeitmodell zum Einsatz. "
                  "Die Betriebe stellten zudem Angaben zu Düngermengen, Beweidung und Bodenbearbeitung für jede Parzelle zur Verfügung. "
                  "Die Ergebnisse zeigen, dass eine Verlagerung der Ausbringung in das Frühjahr die Spitzenkonzentrationen im Herbst um rund ein Viertel senkte, "
                  "während der mittlere Nitratgehalt wegen der im Untergrund gespeicherten Altlasten nur langsam zurückging. "
                  "Für den Schutz der Trinkwasserressourcen empfehlen wir gezielte Maßnahmen in besonders durchlässigen Neubildungsgebieten.")),
    dict(
        lang="de", file="bib", year=2025, goals=("7", "13"), dept="CEE", partner="Lindenau",
        title="Wärmepumpen im Gebäudebestand: Feldmessungen und Klimabilanz nach energetischer Sanierung",
        keywords=("Wärmepumpe", "Gebäudesanierung", "Energieeffizienz", "Treibhausgasemissionen"),
        abstract=("Die Dekarbonisierung der Raumwärme gilt als einer der schwierigsten Bausteine der Energiewende. "
                  "Wärmepumpen sollen fossile Heizkessel ersetzen, doch ihre Effizienz in älteren, teilweise sanierten Gebäuden wird häufig angezweifelt. "
                  "In dieser Studie wurden 37 Einfamilienhäuser aus den Baujahren 1960 bis 1985 über zwei Heizperioden messtechnisch begleitet. "
                  "Erfasst wurden Wärmemengen, Stromverbrauch, Vorlauftemperaturen und Raumtemperaturen in stündlicher Auflösung. "
                  "Die mittlere Jahresarbeitszahl lag bei 3,1 und damit nur wenig unter den Werten in Neubauten; "
                  "entscheidend waren ausreichend dimensionierte Heizflächen und eine sorgfältige Einregulierung. "
                  "Gegenüber dem vorherigen Ölkessel sanken die betriebsbedingten Treibhausgasemissionen im Mittel um 62 Prozent. "
                  "Die Heizkosten der Haushalte blieben trotz gestiegener Strompreise in den meisten Fällen stabil oder gingen leicht zurück. "
                  "Die Ergebnisse sprechen dafür, Förderprogramme stärker an den Austausch von Heizkörpern und an Beratung zur Regelung zu koppeln.")),
    dict(
        lang="es", file="csv", year=2023, goals=("6", "3"), dept="CEE", partner="Altamesa",
        title="Calidad del agua de consumo en sistemas comunitarios rurales de los Andes peruanos",
        keywords=("agua potable", "saneamiento rural", "calidad microbiológica", "gestión comunitaria"),
        abstract=("En las zonas rurales andinas, gran parte de la población se abastece de sistemas de agua gestionados por juntas comunitarias con recursos limitados. "
                  "La contaminación microbiológica de estas fuentes sigue siendo una causa importante de enfermedades diarreicas en la infancia. "
                  "Este estudio evaluó la calidad del agua y las prácticas de cloración en 64 sistemas comunitarios de tres provincias. "
                  "Se tomaron muestras en la captación, el reservorio y los grifos domiciliarios durante las estaciones seca y lluviosa, "
                  "y se realizaron entrevistas con los operadores de cada sistema. "
                  "Se detectaron coliformes termotolerantes en el 58 % de las muestras de grifo en época de lluvias, frente al 31 % en época seca; "
                  "solo una cuarta parte de los sistemas mantenía cloro residual adecuado. "
                  "Los resultados muestran la necesidad de apoyo técnico continuo y de financiamiento estable para garantizar agua segura en comunidades rurales.")),
    dict(
        lang="es", file="ris", year=2024, goals=("5", "16"), dept="ESS", partner="Cerro Azul",
        title="Violencia de género y acceso a la justicia en municipios rurales de Colombia",
        keywords=("violencia de género", "acceso a la justicia", "ruralidad", "comisarías de familia"),
        abstract=("La violencia contra las mujeres es un problema persistente en las zonas rurales de Colombia, donde la presencia institucional es débil. "
                  "Este artículo analiza las barreras que enfrentan las mujeres rurales para denunciar y obtener medidas de protección. "
                  "A partir de 42 entrevistas en profundidad con sobrevivientes, funcionarias de comisarías de familia y lideresas comunitarias, "
                  "y del análisis de 1.300 expedientes, se identifican obstáculos geográficos, económicos y culturales. "
                  "Las distancias a las instituciones, la dependencia económica y la revictimización en la atención aparecen como los factores más relevantes. "
                  "Además, menos de la mitad de las medidas de protección se cumplieron en los plazos previstos. "
                  "Se concluye que fortalecer la atención especializada y las redes comunitarias es clave para una justicia efectiva con enfoque de género.")),
    dict(
        lang="fr", file="csv", year=2022, goals=("4",), dept="ESS", partner="Valtrenne",
        title="Apprentissage de l'écrit en classes multilingues : une étude longitudinale dans les écoles primaires",
        keywords=("littératie", "école primaire", "plurilinguisme", "inégalités scolaires"),
        abstract=("L'apprentissage de l'écrit au cours des premières années de l'école primaire conditionne fortement la suite de la scolarité. "
                  "Dans les classes où de nombreux élèves parlent une autre langue à la maison, les enseignants disposent de peu d'outils adaptés. "
                  "Cette étude longitudinale a suivi 1 140 élèves de 52 classes pendant deux années scolaires. "
                  "Les compétences de décodage, de vocabulaire et de compréhension ont été évaluées trois fois par an, "
                  "et les pratiques pédagogiques ont été observées lors de 210 séances de compréhension de textes. "
                  "Les élèves plurilingues progressaient aussi vite que leurs camarades en décodage, mais l'écart de vocabulaire se maintenait. "
                  "Les classes où l'enseignement explicite du vocabulaire était fréquent présentaient des écarts nettement plus faibles. "
                  "Ces résultats plaident pour une formation des enseignants centrée sur le vocabulaire et la compréhension.")),
    dict(
        lang="fr", file="bib", year=2025, goals=("3", "5"), dept="LSM", partner="Shire Highlands",
        title="Qualité des soins prénatals et accouchements assistés en zone rurale : étude mixte au Sénégal et au Malawi",
        keywords=("santé maternelle", "soins prénatals", "agents de santé communautaire", "zones rurales"),
        abstract=("La mortalité maternelle demeure élevée dans de nombreuses zones rurales d'Afrique subsaharienne, où l'accès aux soins qualifiés reste limité. "
                  "Cette étude examine la qualité des soins prénatals et les facteurs associés à l'accouchement dans un établissement de santé. "
                  "Nous avons combiné une enquête auprès de 2 350 femmes ayant accouché au cours des deux dernières années, "
                  "des observations de consultations dans 28 centres de santé et des entretiens avec des sages-femmes. "
                  "Moins de 40 % des consultations observées comprenaient l'ensemble des examens recommandés. "
                  "Les femmes suivies par des agents de santé communautaire étaient plus susceptibles d'accoucher en établissement, "
                  "mais le coût du transport et le manque d'autonomie décisionnelle restaient des obstacles majeurs. "
                  "Améliorer la qualité des soins et l'autonomie des femmes apparaît indispensable pour réduire les décès maternels.")),
    dict(
        lang="pt", file="csv", year=2023, goals=("2", "1"), dept="AFS", partner="Serra Clara",
        title="Agricultura familiar, mercados institucionais e segurança alimentar no semiárido brasileiro",
        keywords=("agricultura familiar", "segurança alimentar", "compras públicas", "semiárido"),
        abstract=("A agricultura familiar responde por parte importante dos alimentos consumidos no Brasil, mas muitos agricultores do semiárido vivem em situação de pobreza. "
                  "Programas de compras públicas de alimentos procuram garantir renda aos produtores e abastecer escolas com alimentos frescos. "
                  "Este trabalho avalia os efeitos da participação nesses programas sobre a renda e a segurança alimentar das famílias agricultoras. "
                  "Utilizamos dados de um painel com 1 820 domicílios entrevistados em 2017 e 2021 e um desenho de diferenças em diferenças com pareamento. "
                  "A participação aumentou a renda agrícola em cerca de 18 % e reduziu a proporção de famílias em insegurança alimentar moderada ou grave. "
                  "Os efeitos foram maiores entre famílias chefiadas por mulheres e em municípios com cooperativas atuantes. "
                  "Os resultados reforçam o papel dos mercados institucionais no combate à fome e à pobreza rural.")),
)
