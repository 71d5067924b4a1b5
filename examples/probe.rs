fn main() {
    let path = std::env::args().nth(1).unwrap();
    let book = match stationwise::format::load(std::path::Path::new(&path)) { Ok(b) => b, Err(e) => { println!("ERR {e}"); return; } };
    let e = stationwise::engine::Engine::new(book.clone()).unwrap();
    for s in &book.stations { println!("{} {:?}", s.name, e.station(&s.name)); }
    println!("{:?}", e.summary());
    println!("{:?}", e.problems());
    print!("{}", stationwise::format::to_text(&book));
}
