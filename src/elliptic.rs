pub fn k(){}
